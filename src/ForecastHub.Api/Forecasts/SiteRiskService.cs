using System.Collections.Concurrent;
using ForecastHub.Api.Models;
using ForecastHub.Core.Health;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Forecasts;

/// <summary>A site's risk now: per threshold and window, with the confidence and the cautions of the forecast it comes from.</summary>
public sealed record CurrentSiteRisk(
    string SiteId,
    DateTimeOffset IssuedAt,
    DateTimeOffset Origin,
    string Confidence,
    ConfidenceReason? ConfidenceReason,
    IReadOnlyList<RiskResponse> Risk,
    IReadOnlyList<string> Cautions);

/// <summary>
/// The one entry point for a site's current risk (alerts, sweeps, schedulers): the risk of the
/// site's default forecast, computed from the same cache as GET .../forecast, so a sweep and a
/// dashboard never see different numbers and a repeated call costs a look-up. The latest risk of
/// each site is kept for readers that must not compute (the metrics scrape).
/// </summary>
public sealed class SiteRiskService(ForecastService forecasts)
{
    private readonly ConcurrentDictionary<string, CurrentSiteRisk> latest = new(StringComparer.Ordinal);

    /// <param name="assessment">The site's health now, when the caller has judged it (a computed forecast then does not judge it again).</param>
    public async Task<(CurrentSiteRisk? Risk, ForecastUnavailable? Unavailable)> EvaluateAsync(SiteRecord site, HealthAssessment? assessment, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(site);
        var (query, _, _) = ForecastQuery.Parse(site.IsDaily, null, null, null, null);
        var (forecast, unavailable) = await forecasts.GetAsync(site, query!, assessment, cancellationToken);
        if (forecast is null)
        {
            latest.TryRemove(site.Id, out _);
            return (null, unavailable);
        }
        var risk = new CurrentSiteRisk(site.Id, forecast.IssuedAt, forecast.Origin, forecast.Confidence, forecast.ConfidenceReason, forecast.Risk, forecast.Cautions);
        latest[site.Id] = risk;
        return (risk, null);
    }

    /// <summary>The risk of the site's latest evaluation (by the alert sweep or any caller), or null; never computes.</summary>
    public CurrentSiteRisk? Latest(string siteId) => latest.GetValueOrDefault(siteId);
}
