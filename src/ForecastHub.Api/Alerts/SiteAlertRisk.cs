using ForecastHub.Core.Health;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Alerts;

/// <summary>The time of first crossing over the sample paths that cross: median and 10 % / 90 % quantiles.</summary>
public sealed record FirstCrossing(DateTimeOffset Median, DateTimeOffset P10, DateTimeOffset P90);

/// <summary>A site threshold as alerts see it; without <c>AlertProbability</c> it never alerts.</summary>
public sealed record AlertThreshold(string Id, string Direction, double ValueC, double? AlertProbability);

/// <summary>One threshold's risk over one window (<c>night</c> or <c>next24h</c>).</summary>
public sealed record ThresholdWindowRisk(
    AlertThreshold Threshold,
    string Window,
    DateTimeOffset From,
    DateTimeOffset To,
    double Probability,
    FirstCrossing? FirstCrossing);

/// <summary>A site's risk now: the forecast origin it comes from, its confidence, and each threshold's windows.</summary>
public sealed record SiteAlertRisk(DateTimeOffset Origin, string Confidence, string? ConfidenceReason, IReadOnlyList<ThresholdWindowRisk> Windows);

/// <summary>
/// Where alerts get a site's risk: the one seam between alerting and the risk computation of the
/// forecast. Answers null when the site has no risk to give (no model yet, or no thresholds).
/// </summary>
public interface ISiteRiskSource
{
    /// <param name="assessment">The site's health, judged once per evaluation and shared with the forecast behind the risk.</param>
    Task<SiteAlertRisk?> GetAsync(SiteRecord site, HealthAssessment assessment, CancellationToken cancellationToken);
}
