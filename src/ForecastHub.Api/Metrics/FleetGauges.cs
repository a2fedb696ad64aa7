using System.Diagnostics.Metrics;
using System.Globalization;
using ForecastHub.Api.Forecasts;
using ForecastHub.Api.Health;
using ForecastHub.Core.Risk;
using ForecastHub.Api.Models;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Metrics;

/// <summary>
/// Gauges read from the latest fleet evaluation when a scrape collects them: sites per state, the
/// refit queue, and per site (at most <see cref="MetricsOptions.MaxSiteSeries"/> sites, so label
/// cardinality stays bounded) its health state, the age of its newest reading and each threshold's
/// probability for the coming night, as of the site's latest risk evaluation (a scrape never computes one).
/// </summary>
public sealed class FleetGauges
{
    private readonly FleetHealth fleet;
    private readonly TimeProvider clock;
    private readonly SiteRiskService risks;
    private readonly int maxSites;

    public FleetGauges(ServiceMetrics metrics, FleetHealth fleet, RefitQueue queue, SiteRiskService risks, TimeProvider clock, IOptions<MetricsOptions> options)
    {
        ArgumentNullException.ThrowIfNull(metrics);
        ArgumentNullException.ThrowIfNull(queue);
        ArgumentNullException.ThrowIfNull(options);
        this.fleet = fleet;
        this.clock = clock;
        this.risks = risks;
        maxSites = options.Value.MaxSiteSeries;
        var meter = metrics.Meter;
        meter.CreateObservableGauge("forecasthub.sites", SitesByState,
            description: "Sites by model-health state, as of the latest fleet evaluation.");
        meter.CreateObservableGauge("forecasthub.refit.queue.length", () => queue.Count,
            description: "Sites waiting to be looked at by the refit service.");
        meter.CreateObservableGauge("forecasthub.site.health", SiteStates,
            description: "1 for each site's current model-health state (one series per site).");
        meter.CreateObservableGauge("forecasthub.site.reading.age", ReadingAges, unit: "s",
            description: "Seconds since each site's newest reading.");
        meter.CreateObservableGauge("forecasthub.site.risk.night.probability", NightRisks,
            description: "Each threshold's probability for the site's coming night, as of the site's latest risk evaluation.");
        meter.CreateObservableGauge("forecasthub.site.series.omitted", () => Math.Max(0, fleet.LatestSites.Count - maxSites),
            description: "Sites left out of the per-site series because of Metrics:MaxSiteSeries.");
    }

    private IEnumerable<Measurement<int>> SitesByState() =>
        (fleet.Latest?.Counts ?? new Dictionary<string, int>())
            .Select(kv => new Measurement<int>(kv.Value, new KeyValuePair<string, object?>("state", kv.Key)));

    private IEnumerable<Measurement<int>> SiteStates() =>
        fleet.LatestSites.Take(maxSites).Select(s => new Measurement<int>(1,
            new KeyValuePair<string, object?>("site", s.SiteId), new KeyValuePair<string, object?>("state", s.State)));

    private IEnumerable<Measurement<double>> ReadingAges()
    {
        var now = clock.GetUtcNow();
        return fleet.LatestSites.Take(maxSites)
            .Where(s => s.LastObservationAt is not null)
            .Select(s => new Measurement<double>((now - s.LastObservationAt!.Value).TotalSeconds,
                new KeyValuePair<string, object?>("site", s.SiteId)));
    }

    private IEnumerable<Measurement<double>> NightRisks() =>
        fleet.LatestSites.Take(maxSites)
            .SelectMany(s => risks.Latest(s.SiteId)?.Risk.Where(r => r.Window.Name == RiskWindow.Night) ?? [], (s, r) => new Measurement<double>(r.Probability,
                new KeyValuePair<string, object?>("direction", r.Direction),
                new KeyValuePair<string, object?>("site", s.SiteId),
                new KeyValuePair<string, object?>("threshold", r.Id ?? r.Threshold.ToString(CultureInfo.InvariantCulture))));
}
