using System.Diagnostics.CodeAnalysis;
using System.Text.Json;
using System.Text.Json.Serialization;

namespace ForecastHub.Api.Models;

/// <summary>
/// One versioned JSON form the service stores: <c>{"format": N, "&lt;name&gt;": {...}}</c>, property names in
/// camelCase and enums as kebab-case names. Text of any other format (an older build's unversioned
/// JSON, or a newer build's format) is refused, never read into the records.
/// </summary>
public sealed class StoredFormat<T>(string name, int version)
    where T : class
{
    // NaN stands for an undefined statistic in places; named literals keep it round-trippable.
    private static readonly JsonSerializerOptions Json = new(JsonSerializerDefaults.Web)
    {
        NumberHandling = JsonNumberHandling.AllowNamedFloatingPointLiterals,
        Converters = { new JsonStringEnumConverter(JsonNamingPolicy.KebabCaseLower, allowIntegerValues: false) },
    };

    private const string FormatProperty = "format";

    /// <summary>The format number this build writes and reads.</summary>
    public int Version => version;

    public string Write(T value)
    {
        using var buffer = new MemoryStream();
        using (var writer = new Utf8JsonWriter(buffer))
        {
            writer.WriteStartObject();
            writer.WriteNumber(FormatProperty, version);
            writer.WritePropertyName(name);
            JsonSerializer.Serialize(writer, value, Json);
            writer.WriteEndObject();
        }

        return System.Text.Encoding.UTF8.GetString(buffer.GetBuffer(), 0, (int)buffer.Length);
    }

    /// <summary>False when <paramref name="json"/> is not of this format; <paramref name="format"/> then names the format found (null: none, the unversioned first layout).</summary>
    public bool TryRead(string json, [NotNullWhen(true)] out T? value, out int? format)
    {
        value = null;
        format = null;
        using var document = JsonDocument.Parse(json);
        var root = document.RootElement;
        if (root.ValueKind != JsonValueKind.Object || !root.TryGetProperty(FormatProperty, out var number))
        {
            return false;
        }

        format = number.ValueKind == JsonValueKind.Number && number.TryGetInt32(out var found) ? found : -1;
        if (format != version || !root.TryGetProperty(name, out var body))
        {
            return false;
        }

        value = body.Deserialize<T>(Json);
        return value is not null;
    }

    /// <summary>How a refused text's format is named in logs and answers.</summary>
    public string Describe(int? format) => format is { } n ? $"format {n}" : "the unversioned first format";
}
