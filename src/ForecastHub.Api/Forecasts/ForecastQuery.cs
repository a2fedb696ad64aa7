using System.Globalization;

namespace ForecastHub.Api.Forecasts;

/// <summary>A validated forecast request; <see cref="Key"/> is its canonical form for the cache.</summary>
public sealed record ForecastQuery(int Steps, IReadOnlyList<double> Levels, IReadOnlyList<double> Below, IReadOnlyList<double> Above)
{
    public const int MaxHourlySteps = 240;
    public const int MaxDailySteps = 14;
    public const int MaxLevels = 5;
    public const int MaxThresholds = 10;

    public static IReadOnlyList<double> DefaultLevels { get; } = [80, 95];

    public string Key => string.Join('|', Steps.ToString(CultureInfo.InvariantCulture), Join(Levels), Join(Below), Join(Above));

    /// <summary>
    /// Parses the query string values; on a bad value answers the field and a reason instead.
    /// Steps default to 48 (hourly) or 3 (daily); levels to 80,95; thresholds in degrees C.
    /// </summary>
    public static (ForecastQuery? Query, string? Field, string? Error) Parse(bool isDaily, string? steps, string? levels, string? below, string? above,
        string unit = Observations.TemperatureUnits.Celsius)
    {
        var maxSteps = isDaily ? MaxDailySteps : MaxHourlySteps;
        var stepCount = isDaily ? 3 : 48;
        if (!string.IsNullOrWhiteSpace(steps)
            && (!int.TryParse(steps, NumberStyles.None, CultureInfo.InvariantCulture, out stepCount) || stepCount < 1 || stepCount > maxSteps))
        {
            return (null, "steps", $"steps must be a whole number from 1 to {maxSteps} for a {(isDaily ? "daily" : "hourly")} site.");
        }

        var (levelList, levelError) = ParseList(levels, DefaultLevels, MaxLevels, v => v is > 0 and < 100, "levels",
            "levels must be a comma-separated list of up to 5 percentages strictly between 0 and 100, such as 80,95.");
        if (levelError is not null)
        {
            return (null, "levels", levelError);
        }

        // Thresholds come in the answer's unit and are kept in degrees C (rounded, so 32 F is exactly 0 C).
        const string thresholdRule = "must be a comma-separated list of up to 10 temperatures in the answer's unit, between -95 and 65 degrees C.";
        Func<double, double> toCelsius = v => Math.Round(Observations.TemperatureUnits.ToCelsius(v, unit), 9);
        var (belowList, belowError) = ParseList(below, [], MaxThresholds, v => v is >= -95 and <= 65, "below", "below " + thresholdRule, toCelsius);
        if (belowError is not null)
        {
            return (null, "below", belowError);
        }

        var (aboveList, aboveError) = ParseList(above, [], MaxThresholds, v => v is >= -95 and <= 65, "above", "above " + thresholdRule, toCelsius);
        if (aboveError is not null)
        {
            return (null, "above", aboveError);
        }

        return (new ForecastQuery(stepCount, levelList!, belowList!, aboveList!), null, null);
    }

    private static (IReadOnlyList<double>? Values, string? Error) ParseList(string? text, IReadOnlyList<double> fallback, int max,
        Func<double, bool> valid, string field, string rule, Func<double, double>? convert = null)
    {
        if (string.IsNullOrWhiteSpace(text))
        {
            return (fallback, null);
        }

        var parts = text.Split(',', StringSplitOptions.TrimEntries);
        if (parts.Length > max)
        {
            return (null, rule);
        }

        var values = new List<double>();
        foreach (var part in parts)
        {
            if (!double.TryParse(part, NumberStyles.AllowLeadingSign | NumberStyles.AllowDecimalPoint, CultureInfo.InvariantCulture, out var v)
                || !double.IsFinite(v) || !valid(v = convert?.Invoke(v) ?? v))
            {
                return (null, $"'{Shorten(part)}' in {field} is not valid: {rule}");
            }

            values.Add(v);
        }

        return ([.. values.Distinct().Order()], null);
    }

    private static string Shorten(string text) => text.Length <= 20 ? text : text[..20] + "...";

    private static string Join(IReadOnlyList<double> values) => string.Join(',', values.Select(v => v.ToString("R", CultureInfo.InvariantCulture)));
}
