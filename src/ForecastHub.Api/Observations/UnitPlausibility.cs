using System.Globalization;
using ForecastHub.Api.Sites;
using ForecastHub.Core.Quality;

namespace ForecastHub.Api.Observations;

/// <summary>
/// The batch rule against a unit mix-up (common practice, no source): a batch of at least
/// <see cref="MinValues"/> values sent in degrees C is refused whole when, read as C, it is not
/// plausible for the site, while read as F or K it is. Plausible means: more than half of the values
/// lie inside the site's own limits (minC..maxC), and the median lies inside
/// <see cref="TypicalMinC"/>..<see cref="TypicalMaxC"/>, the span of typical air temperatures on Earth
/// (the warmest places average under 40 C over a day; a logger's median above 45 C is hotter than any
/// climate). A Fahrenheit file of a cold season (median 20 F is -6.7 C) is plausible as C and cannot
/// be told apart; single readings get only the per-row physical range.
/// </summary>
internal static class UnitPlausibility
{
    public const int MinValues = 6;
    public const double TypicalMinC = -50;
    public const double TypicalMaxC = 45;

    /// <summary>Null when the batch may be stored; otherwise the reason, with the unit it looks like.</summary>
    public static string? Check(ReadingBatch batch, QualityLimits limits)
    {
        ArgumentNullException.ThrowIfNull(batch);
        ArgumentNullException.ThrowIfNull(limits);
        // The usual batch lies wholly inside the site's limits and the typical span: plausible without sorting.
        var (low, high) = (Math.Max(limits.MinC, TypicalMinC), Math.Min(limits.MaxC, TypicalMaxC));
        var inside = batch.ImpossibleCelsius.Count == 0;
        foreach (var r in batch.Valid)
        {
            if (r.OriginalUnit == TemperatureUnits.Celsius && (r.OriginalValue < low || r.OriginalValue > high))
            {
                inside = false;
                break;
            }
        }
        if (inside)
        {
            return null;
        }
        var sent = batch.Valid.Where(r => r.OriginalUnit == TemperatureUnits.Celsius).Select(r => r.OriginalValue)
            .Concat(batch.ImpossibleCelsius).ToArray();
        return Check(sent, limits);
    }

    /// <summary>The rule on values sent in degrees C.</summary>
    public static string? Check(IReadOnlyList<double> sentAsCelsius, QualityLimits limits)
    {
        ArgumentNullException.ThrowIfNull(sentAsCelsius);
        ArgumentNullException.ThrowIfNull(limits);
        if (sentAsCelsius.Count < MinValues)
        {
            return null;
        }
        var asC = Assess(sentAsCelsius, TemperatureUnits.Celsius, limits);
        if (asC.Plausible)
        {
            return null;
        }
        var likely = new[] { TemperatureUnits.Fahrenheit, TemperatureUnits.Kelvin }
            .Select(u => Assess(sentAsCelsius, u, limits))
            .FirstOrDefault(a => a.Plausible);
        if (likely.Unit is null)
        {
            return null;
        }
        return string.Create(CultureInfo.InvariantCulture,
            $"The readings are sent in degrees C, but {asC.Outside} of the {sentAsCelsius.Count} values lie outside this site's limits {limits.MinC}..{limits.MaxC} C or the physical range {SiteRules.PhysicalMinC}..{SiteRules.PhysicalMaxC} C, and their median {asC.MedianC:0.##} C is no typical air temperature. Read as {likely.Unit} they fit (median {likely.MedianC:0.##} C, {likely.Outside} outside the limits): if they are {Name(likely.Unit)}, send unit={likely.Unit} (or a unit column). Nothing of this batch was stored.");
    }

    private static (string? Unit, bool Plausible, int Outside, double MedianC) Assess(IReadOnlyList<double> sent, string unit, QualityLimits limits)
    {
        var celsius = sent.Select(v => TemperatureUnits.ToCelsius(v, unit)).Order().ToArray();
        var outside = celsius.Count(c => c < Math.Max(limits.MinC, SiteRules.PhysicalMinC) || c > Math.Min(limits.MaxC, SiteRules.PhysicalMaxC));
        var median = celsius.Length % 2 == 1 ? celsius[celsius.Length / 2] : (celsius[(celsius.Length / 2) - 1] + celsius[celsius.Length / 2]) / 2;
        var plausible = outside * 2 < celsius.Length && median >= TypicalMinC && median <= TypicalMaxC;
        return (unit, plausible, outside, median);
    }

    private static string Name(string unit) => unit == TemperatureUnits.Fahrenheit ? "degrees Fahrenheit" : "kelvin";
}
