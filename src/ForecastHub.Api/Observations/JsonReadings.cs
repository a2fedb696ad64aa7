using System.Text.Json;

namespace ForecastHub.Api.Observations;

/// <summary>The JSON body <c>{ "unit": "C", "readings": [{ "time": "...", "value": 1.2, "unit": "F" }] }</c>
/// (<c>unit</c> optional at both levels). Structural errors refuse the whole body; a bad row is
/// refused alone.</summary>
internal static class JsonReadings
{
    public static (List<RawReading>? Rows, string? BodyUnit, string? Field, string? Error, bool TooMany) Parse(JsonElement root, int maxReadings)
    {
        if (root.ValueKind != JsonValueKind.Object)
        {
            return (null, null, "body", "The body must be a JSON object with a 'readings' array.", false);
        }
        string? unit = null;
        JsonElement? readings = null;
        foreach (var property in root.EnumerateObject())
        {
            switch (property.Name)
            {
                case "unit" when property.Value.ValueKind == JsonValueKind.String:
                    unit = property.Value.GetString();
                    break;
                case "unit" when property.Value.ValueKind == JsonValueKind.Null:
                    break;
                case "unit":
                    return (null, null, "unit", "unit must be a string: 'C', 'F' or 'K'.", false);
                case "readings" when property.Value.ValueKind == JsonValueKind.Array:
                    readings = property.Value;
                    break;
                case "readings":
                    return (null, null, "readings", "readings must be an array of { time, value } objects.", false);
                default:
                    return (null, null, property.Name, $"Unknown field '{IsoTime.Clip(property.Name)}': the body has 'unit' and 'readings' only.", false);
            }
        }
        if (readings is not { } array)
        {
            return (null, null, "readings", "readings is required: an array of { time, value } objects.", false);
        }
        var count = array.GetArrayLength();
        if (count > maxReadings)
        {
            return (null, null, "readings", $"{count} readings in one request; at most {maxReadings} are allowed.", true);
        }
        var rows = new List<RawReading>(count);
        var index = 0;
        foreach (var element in array.EnumerateArray())
        {
            rows.Add(ParseRow(element, index++));
        }
        return (rows, unit, null, null, false);
    }

    private static RawReading ParseRow(JsonElement element, int index)
    {
        if (element.ValueKind != JsonValueKind.Object)
        {
            return new RawReading(index, null, null, null, null, "a reading must be an object { time, value }.");
        }
        string? time = null;
        double? value = null;
        string? unit = null;
        string? error = null;
        foreach (var property in element.EnumerateObject())
        {
            switch (property.Name)
            {
                case "time" when property.Value.ValueKind == JsonValueKind.String:
                    time = property.Value.GetString();
                    break;
                case "time":
                    error ??= "time must be a string such as " + IsoTime.Example + ".";
                    break;
                case "value" when property.Value.ValueKind == JsonValueKind.Number:
                    if (property.Value.TryGetDouble(out var v) && double.IsFinite(v))
                    {
                        value = v;
                    }
                    else
                    {
                        error ??= "value is not a finite number.";
                    }
                    break;
                case "value":
                    error ??= "value must be a JSON number (not a string, null or other type).";
                    break;
                case "unit" when property.Value.ValueKind == JsonValueKind.String:
                    unit = property.Value.GetString();
                    break;
                case "unit":
                    error ??= TemperatureUnits.UnknownUnitMessage;
                    break;
                default:
                    error ??= $"unknown field '{IsoTime.Clip(property.Name)}': a reading has 'time', 'value' and optionally 'unit'.";
                    break;
            }
        }
        if (error is null && time is null)
        {
            error = "time is missing.";
        }
        if (error is null && value is null)
        {
            error = "value is missing.";
        }
        return new RawReading(index, null, time, value, unit, error);
    }
}
