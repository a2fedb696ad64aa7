using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Quality;
using ForecastHub.Core.Risk;

namespace ForecastHub.Storage.Sites;

/// <summary>A stored site with its typed settings (parsed once at the HTTP edge or the command line).
/// <c>DailyStatistic</c> is set for daily sites only. <c>SettingsVersion</c> goes up by one on every
/// change of settings, so a refit can tell which settings a model was fitted with.</summary>
public sealed record SiteRecord(
    string Id,
    string Name,
    string TimeZone,
    GridCadence Cadence,
    DailyStatistic? DailyStatistic,
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

    public bool IsDaily => Cadence == GridCadence.Daily;

    /// <summary>How this site's readings become its grid.</summary>
    public GridOptions GridOptions => new(Cadence, TimeZone, DailyStatistic ?? Core.Grid.DailyStatistic.Mean);

    /// <summary>Thresholds and night hours; a change re-evaluates risk but needs no refit.</summary>
    public SiteRiskSettings Risk { get; init; } = SiteRiskSettings.Default;

    /// <summary>The stored record after <paramref name="proposed"/> is applied at <paramref name="now"/>: id and
    /// creation kept, and the settings version raised only when something a fit depends on changed.</summary>
    public SiteRecord UpdatedTo(SiteRecord proposed, DateTimeOffset now)
    {
        ArgumentNullException.ThrowIfNull(proposed);
        // Names and risk settings need no refit; a risk change re-evaluates through the forecast cache key.
        // Bookkeeping fields are this record's own, so only settings a fit reads are compared.
        var settingsChanged = proposed with
        {
            Id = Id, Key = Key, Name = Name, Risk = Risk, CreatedAt = CreatedAt, UpdatedAt = UpdatedAt, SettingsVersion = SettingsVersion,
        } != this;
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
