using System.Globalization;
using ForecastHub.Core.Modeling;

namespace ForecastHub.Core.Risk;

/// <summary>One threshold of a site (DESIGN section 10); without <c>AlertProbability</c> it is shown but never alerts.</summary>
public sealed record SiteThreshold(string Id, ThresholdDirection Direction, double ValueC, double? AlertProbability)
{
    /// <summary>The threshold as the risk assessment takes it.</summary>
    public RiskThreshold ToRisk() => new(Id, Direction, ValueC);
}

/// <summary>A site's thresholds (at most <see cref="MaxThresholds"/>, ids unique) and its night.
/// Equal when the thresholds are equal one by one, so an unchanged PATCH stays a no-op.</summary>
public sealed record SiteRiskSettings(IReadOnlyList<SiteThreshold> Thresholds, NightHours Night)
{
    public const int MaxThresholds = 8;

    public static SiteRiskSettings Default { get; } = new([], NightHours.Default);

    /// <summary>A canonical text of the settings, for cache keys.</summary>
    public string Key => string.Join(';', Thresholds.Select(t => FormattableString.Invariant($"{t.Id},{t.Direction},{t.ValueC:R},{t.AlertProbability:R}")))
        + "|" + Night.Start.ToString("HH:mm", CultureInfo.InvariantCulture) + "-" + Night.End.ToString("HH:mm", CultureInfo.InvariantCulture);

    /// <summary>The site's thresholds, then the query's that the site does not already have (same direction and value).</summary>
    public IReadOnlyList<RiskThreshold> WithQueryThresholds(IReadOnlyList<double> below, IReadOnlyList<double> above)
    {
        ArgumentNullException.ThrowIfNull(below);
        ArgumentNullException.ThrowIfNull(above);
        var list = Thresholds.Select(t => t.ToRisk()).ToList();
        foreach (var t in below.Select(v => new RiskThreshold(null, ThresholdDirection.Below, v))
                     .Concat(above.Select(v => new RiskThreshold(null, ThresholdDirection.Above, v))))
        {
            if (!list.Any(s => s.Direction == t.Direction && s.ValueC == t.ValueC))
            {
                list.Add(t);
            }
        }

        return list;
    }

    public bool Equals(SiteRiskSettings? other) =>
        other is not null && Night == other.Night && Thresholds.SequenceEqual(other.Thresholds);

    public override int GetHashCode() => HashCode.Combine(Night, Thresholds.Count);
}
