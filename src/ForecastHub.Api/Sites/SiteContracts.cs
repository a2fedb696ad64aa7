using ForecastHub.Core.Quality;
using ForecastHub.Core.Settings;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Sites;

/// <summary>Body of <c>POST /api/v1/sites</c> and <c>PATCH /api/v1/sites/{siteId}</c>. On PATCH an
/// absent field keeps its value; <c>null</c> clears <c>latitude</c>, <c>longitude</c> and
/// <c>elevationM</c>.</summary>
public sealed record SiteBody(
    string? Id,
    string? Name,
    string? TimeZone,
    string? Cadence,
    string? DailyStatistic,
    double? Latitude,
    double? Longitude,
    double? ElevationM,
    QualityBody? Quality,
    ModelBody? Model,
    IReadOnlyList<ThresholdBody>? Thresholds = null,
    NightBody? Night = null);

/// <summary>A site threshold: <c>id</c> a slug unique in the site, <c>direction</c> "below" or "above",
/// <c>valueC</c> in degrees C, <c>alertProbability</c> in (0, 1] (absent: shown, never alerts).</summary>
public sealed record ThresholdBody(string? Id, string? Direction, double? ValueC, double? AlertProbability);

/// <summary>The site's night as local clock times "HH:mm"; an end at or before the start runs past midnight.</summary>
public sealed record NightBody(string? StartLocal, string? EndLocal);

public sealed record QualityBody(double? MinC, double? MaxC, double? MaxStepCPerHour, double? FlatlineHours);

public sealed record ModelBody(string? Seasonality, string? Method, string? OrderPolicy, int? MaxOrder, int? FitWindowDays, string? IntervalMethod);

/// <summary>A site as the API shows it.</summary>
public record SiteResponse(
    string Id,
    string Name,
    string TimeZone,
    string Cadence,
    string? DailyStatistic,
    double? Latitude,
    double? Longitude,
    double? ElevationM,
    QualityResponse Quality,
    SiteModelSettingsResponse Model,
    DateTimeOffset CreatedAt,
    DateTimeOffset UpdatedAt,
    long SettingsVersion,
    IReadOnlyList<ThresholdResponse> Thresholds,
    NightResponse Night)
{
    public static SiteResponse From(SiteRecord site)
    {
        ArgumentNullException.ThrowIfNull(site);
        return new SiteResponse(site.Id, site.Name, site.TimeZone, WireNames.Cadences.Of(site.Cadence),
            site.DailyStatistic is { } daily ? WireNames.DailyStatistics.Of(daily) : null,
            site.Latitude, site.Longitude, site.ElevationM,
            new QualityResponse(site.Quality.MinC, site.Quality.MaxC, site.Quality.MaxStepCPerHour, site.Quality.FlatlineHours),
            SiteModelSettingsResponse.From(site.Model),
            site.CreatedAt, site.UpdatedAt, site.SettingsVersion,
            [.. site.Risk.Thresholds.Select(t => new ThresholdResponse(t.Id, WireNames.ThresholdDirections.Of(t.Direction), t.ValueC, t.AlertProbability))],
            new NightResponse(WireNames.ClockTime(site.Risk.Night.Start), WireNames.ClockTime(site.Risk.Night.End)));
    }
}

public sealed record ThresholdResponse(string Id, string Direction, double ValueC, double? AlertProbability);

public sealed record NightResponse(string StartLocal, string EndLocal);

public sealed record QualityResponse(double MinC, double MaxC, double MaxStepCPerHour, double FlatlineHours);

/// <summary>A site's model settings in their wire words.</summary>
public sealed record SiteModelSettingsResponse(string Seasonality, string Method, string OrderPolicy, int MaxOrder, int FitWindowDays, string IntervalMethod)
{
    public static SiteModelSettingsResponse From(ForecastHub.Core.Modeling.ModelSettings settings)
    {
        ArgumentNullException.ThrowIfNull(settings);
        return new(WireNames.Seasonalities.Of(settings.Seasonality), WireNames.Methods.Of(settings.Method),
            WireNames.OrderPolicies.Of(settings.OrderPolicy), settings.MaxOrder, settings.FitWindowDays,
            WireNames.IntervalMethods.Of(settings.IntervalMethod));
    }
}

/// <summary>A site in the list, with its model-health state (the <c>state</c> of <c>GET .../health</c>).</summary>
public sealed record ListedSiteResponse(SiteResponse Site, string HealthState)
    : SiteResponse(Site ?? throw new ArgumentNullException(nameof(Site)))
{
    // The site's fields stay at the top level of the JSON; this one is only the constructor's input.
    [System.Text.Json.Serialization.JsonIgnore]
    public SiteResponse Site { get; init; } = Site;
}

/// <summary>One page of sites; <c>next</c> is the link to the following page, null on the last.</summary>
public sealed record SiteList(IReadOnlyList<ListedSiteResponse> Sites, string? Next) : Http.IPagedList;

internal static class QualityDefaults
{
    public static QualityLimits For(QualityBody? body) => new(
        body?.MinC ?? QualityLimits.DefaultMinC,
        body?.MaxC ?? QualityLimits.DefaultMaxC,
        body?.MaxStepCPerHour ?? QualityLimits.DefaultMaxStepCPerHour,
        body?.FlatlineHours ?? QualityLimits.DefaultFlatlineHours);
}
