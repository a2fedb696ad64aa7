using ForecastHub.Api.Forecasts;
using ForecastHub.Core.Health;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Alerts;

/// <summary>
/// Alerts read a site's risk from <see cref="SiteRiskService"/>: the risk of the site's default
/// forecast, from the same cache as <c>GET .../forecast</c>, so an alert and the dashboard never
/// disagree. A site without thresholds costs no forecast.
/// </summary>
public sealed class ForecastRiskSource(SiteRiskService risks) : ISiteRiskSource
{
    public async Task<SiteAlertRisk?> GetAsync(SiteRecord site, HealthAssessment assessment, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(site);
        if (!site.Risk.Thresholds.Any(t => t.AlertProbability is not null))
        {
            // Nothing can alert: an empty evaluation, so anything still raised clears as removed.
            return new SiteAlertRisk(default, "normal", null, []);
        }

        var (risk, _) = await risks.EvaluateAsync(site, assessment, cancellationToken);
        if (risk is null)
        {
            return null;
        }

        var windows = risk.Risk.Where(r => r.Id is not null).Select(r => new ThresholdWindowRisk(
            new AlertThreshold(r.Id!, r.Direction, r.Threshold, r.AlertProbability),
            r.Window.Name, r.Window.From, r.Window.To, r.Probability,
            r.FirstCrossing is { } c ? new FirstCrossing(c.Median, c.P10, c.P90) : null)).ToList();
        return new SiteAlertRisk(risk.Origin, risk.Confidence, risk.ConfidenceReason?.Code, windows);
    }
}
