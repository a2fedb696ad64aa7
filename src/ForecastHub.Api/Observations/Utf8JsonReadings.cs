using System.Text;
using System.Text.Json;
using ForecastHub.Storage.Readings;

namespace ForecastHub.Api.Observations;

/// <summary>
/// Fast path for the usual JSON body: read straight from the UTF-8 bytes with
/// <see cref="Utf8JsonReader"/> and validated row by row, with no <see cref="JsonDocument"/> and no
/// string per row. It takes only the regular shape (<c>unit</c>, if any, before <c>readings</c>; rows
/// with unescaped <c>time</c>, a finite <c>value</c> and an optional <c>unit</c>, each once). For
/// anything else it answers null and the caller runs the strict <see cref="JsonReadings"/> path,
/// which owns every whole-body and structural rejection and its message; row rules (time, clock,
/// unit, range) are the shared ones of <see cref="ReadingValidation"/>.
/// </summary>
internal static class Utf8JsonReadings
{
    private static readonly UTF8Encoding StrictUtf8 = new(encoderShouldEmitUTF8Identifier: false, throwOnInvalidBytes: true);

    private static readonly JsonReaderOptions Options = new()
    {
        MaxDepth = 16,
        CommentHandling = JsonCommentHandling.Disallow,
        AllowTrailingCommas = false,
    };

    public static ReadingBatch? TryRead(byte[] body, string? queryUnit, DateTimeOffset now, int maxReadings)
    {
        try
        {
            return Read(body, queryUnit, now, maxReadings);
        }
        catch (Exception e) when (e is JsonException or DecoderFallbackException or InvalidOperationException)
        {
            return null;
        }
    }

    private static ReadingBatch? Read(byte[] body, string? queryUnit, DateTimeOffset now, int maxReadings)
    {
        var reader = new Utf8JsonReader(body, Options);
        if (!reader.Read() || reader.TokenType != JsonTokenType.StartObject)
        {
            return null;
        }
        var defaultUnit = queryUnit ?? TemperatureUnits.Celsius;
        var sawUnit = false;
        ReadingBatch? batch = null;
        while (reader.Read() && reader.TokenType == JsonTokenType.PropertyName && !reader.ValueIsEscaped)
        {
            if (reader.ValueTextEquals("unit"u8) && !sawUnit && batch is null)
            {
                sawUnit = true;
                reader.Read();
                if (reader.TokenType == JsonTokenType.Null)
                {
                    continue;
                }
                // An unknown body unit or one that disagrees with ?unit= is the strict path's 400.
                if (reader.TokenType != JsonTokenType.String || KnownUnit(ref reader) is not { } unit
                    || (queryUnit is not null && unit != queryUnit))
                {
                    return null;
                }
                defaultUnit = unit;
            }
            else if (reader.ValueTextEquals("readings"u8) && batch is null)
            {
                if (!reader.Read() || reader.TokenType != JsonTokenType.StartArray)
                {
                    return null;
                }
                batch = ReadRows(ref reader, body, defaultUnit, now + ReadingValidation.MaxAhead, maxReadings);
                if (batch is null)
                {
                    return null;
                }
            }
            else
            {
                return null;
            }
        }
        // The object must close, and nothing but white space may follow (the reader throws otherwise).
        return reader.TokenType == JsonTokenType.EndObject && batch is not null && !reader.Read() ? batch : null;
    }

    private static ReadingBatch? ReadRows(ref Utf8JsonReader reader, byte[] body, string defaultUnit, DateTimeOffset latest, int maxReadings)
    {
        var valid = new List<IncomingReading>(Math.Min(maxReadings, body.Length / 32));
        var rejected = new List<RejectedReading>();
        var impossible = new List<double>();
        var times = new List<(int Start, int Length)>(valid.Capacity);
        while (reader.Read() && reader.TokenType == JsonTokenType.StartObject)
        {
            var index = times.Count;
            if (index == maxReadings)
            {
                return null;
            }
            if (!ReadRow(ref reader, out var time, out var value, out var unit))
            {
                return null;
            }
            times.Add(time);
            var timeBytes = body.AsSpan(time.Start, time.Length);
            string? reason;
            IncomingReading reading;
            if (IsoTime.TryParseCommonUtf8(timeBytes, out var timeMs))
            {
                reason = ReadingValidation.CheckRead(index, timeMs, value, unit ?? defaultUnit, latest, out reading);
            }
            else
            {
                var text = StrictUtf8.GetString(timeBytes);
                reading = default;
                reason = IsoTime.TryParse(text, out var parsed, out var timeError)
                    ? ReadingValidation.CheckRead(index, parsed.ToUnixTimeMilliseconds(), value, unit ?? defaultUnit, latest, out reading)
                    : timeError;
            }
            if (reason is null)
            {
                valid.Add(reading);
            }
            else
            {
                rejected.Add(new RejectedReading(index, null, ReadingValidation.Clip(StrictUtf8.GetString(timeBytes)), reason));
                if (reading.OriginalUnit == TemperatureUnits.Celsius)
                {
                    impossible.Add(reading.OriginalValue);
                }
            }
        }
        if (reader.TokenType != JsonTokenType.EndArray || times.Count == 0)
        {
            return null;
        }
        return new ReadingBatch(times.Count, valid, rejected,
            index => StrictUtf8.GetString(body, times[index].Start, times[index].Length), _ => null, impossible);
    }

    // One { "time": "...", "value": n, "unit"?: "..." } object; false for any other shape.
    private static bool ReadRow(ref Utf8JsonReader reader, out (int Start, int Length) time, out double value, out string? unit)
    {
        time = (-1, 0);
        value = 0;
        unit = null;
        bool hasValue = false, hasUnit = false;
        while (reader.Read() && reader.TokenType == JsonTokenType.PropertyName && !reader.ValueIsEscaped)
        {
            if (reader.ValueTextEquals("time"u8) && time.Start < 0)
            {
                if (!reader.Read() || reader.TokenType != JsonTokenType.String || reader.ValueIsEscaped)
                {
                    return false;
                }
                time = ((int)reader.TokenStartIndex + 1, reader.ValueSpan.Length);
            }
            else if (reader.ValueTextEquals("value"u8) && !hasValue)
            {
                if (!reader.Read() || reader.TokenType != JsonTokenType.Number || !reader.TryGetDouble(out value) || !double.IsFinite(value))
                {
                    return false;
                }
                hasValue = true;
            }
            else if (reader.ValueTextEquals("unit"u8) && !hasUnit)
            {
                if (!reader.Read() || reader.TokenType != JsonTokenType.String)
                {
                    return false;
                }
                unit = KnownUnit(ref reader) ?? reader.GetString();
                hasUnit = true;
            }
            else
            {
                return false;
            }
        }
        return reader.TokenType == JsonTokenType.EndObject && time.Start >= 0 && hasValue;
    }

    private static string? KnownUnit(ref Utf8JsonReader reader) =>
        reader.ValueTextEquals("C"u8) ? TemperatureUnits.Celsius
        : reader.ValueTextEquals("F"u8) ? TemperatureUnits.Fahrenheit
        : reader.ValueTextEquals("K"u8) ? TemperatureUnits.Kelvin
        : null;
}
