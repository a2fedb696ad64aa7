using ForecastHub.Core.Quality;

namespace ForecastHub.Storage.Sites;

/// <summary>A stored site. Settings are kept as the validated strings of the HTTP contract; the
/// model code maps them to its own types. <c>SettingsVersion</c> goes up by one on every change of
/// settings, so a refit can tell which settings a model was fitted with.</summary>
public sealed record SiteRecord(
    string Id,
    string Name,
    string TimeZone,
    string Cadence,
    string? DailyStatistic,
    double? Latitude,
    double? Longitude,
    double? ElevationM,
    QualityLimits Quality,
    ModelSettings Model,
    DateTimeOffset CreatedAt,
    DateTimeOffset UpdatedAt,
    long SettingsVersion = 1)
{
    /// <summary>The store's internal key of this site, given when it is created and never given again
    /// (0 before it is stored). A site deleted and created again under the same id gets a new key, so
    /// background work started for the old one can tell, and its writes are refused.</summary>
    public long Key { get; init; }

    /// <summary>Thresholds and night hours; a change re-evaluates risk but needs no refit.</summary>
    public SiteRiskSettings Risk { get; init; } = SiteRiskSettings.Default;

    /// <summary>The stored record after <paramref name="proposed"/> is applied at <paramref name="now"/>: id and
    /// creation kept, and the settings version raised only when something a fit depends on changed.</summary>
    public SiteRecord UpdatedTo(SiteRecord proposed, DateTimeOffset now)
    {
        ArgumentNullException.ThrowIfNull(proposed);
        // Names and risk settings need no refit; a risk change re-evaluates through the forecast cache key.
        var settingsChanged = proposed with { Name = Name, Risk = Risk, Key = Key } != this;
        return proposed with
        {
            Id = Id,
            Key = Key,
            CreatedAt = CreatedAt,
            UpdatedAt = now,
            SettingsVersion = SettingsVersion + (settingsChanged ? 1 : 0),
        };
    }
}

/// <summary>Model settings of DESIGN section 3, as validated strings and numbers.</summary>
public sealed record ModelSettings(
    string Seasonality,
    string Method,
    string OrderPolicy,
    int MaxOrder,
    int FitWindowDays,
    string IntervalMethod);

/// <summary>One threshold of a site (DESIGN section 10): <c>direction</c> is "below" or "above";
/// without <c>alertProbability</c> it is shown but never alerts.</summary>
public sealed record SiteThreshold(string Id, string Direction, double ValueC, double? AlertProbability);

/// <summary>A site's thresholds (at most 8, ids unique) and its night as local "HH:mm" clock times.
/// Equal when the thresholds are equal one by one, so an unchanged PATCH stays a no-op.</summary>
public sealed record SiteRiskSettings(IReadOnlyList<SiteThreshold> Thresholds, string NightStart, string NightEnd)
{
    public static SiteRiskSettings Default { get; } = new([], "18:00", "09:00");

    /// <summary>A canonical text of the settings, for cache keys.</summary>
    public string Key => string.Join(';', Thresholds.Select(t => FormattableString.Invariant($"{t.Id},{t.Direction},{t.ValueC:R},{t.AlertProbability:R}"))) + "|" + NightStart + "-" + NightEnd;

    public bool Equals(SiteRiskSettings? other) =>
        other is not null && NightStart == other.NightStart && NightEnd == other.NightEnd && Thresholds.SequenceEqual(other.Thresholds);

    public override int GetHashCode() => HashCode.Combine(NightStart, NightEnd, Thresholds.Count);
}
