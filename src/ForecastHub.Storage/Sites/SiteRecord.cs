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
    long SettingsVersion = 1);

/// <summary>Model settings of DESIGN section 3, as validated strings and numbers.</summary>
public sealed record ModelSettings(
    string Seasonality,
    string Method,
    string OrderPolicy,
    int MaxOrder,
    int FitWindowDays,
    string IntervalMethod);
