using System.Diagnostics;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Quality;
using ForecastHub.Core.Risk;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Demo;

/// <summary>How much the demo loaded and how long it took.</summary>
public sealed record DemoLoadResult(int Sites, int Readings, TimeSpan Elapsed);

/// <summary>
/// Replaces the demo sites with freshly generated data up to "now", through the same
/// reading store (one writer, QC flags) that the observations endpoint uses.
/// </summary>
public sealed class DemoLoader(ISiteStore sites, IReadingStore readings, TimeProvider time)
{
    // Large batches keep the load to a few transactions per site; well under the per-request cap.
    private const int BatchSize = 10_000;

    public async Task<DemoLoadResult> LoadAsync(int seed, CancellationToken cancellationToken = default)
    {
        var stopwatch = Stopwatch.StartNew();
        var now = time.GetUtcNow();
        var total = 0;
        foreach (var series in DemoSeriesGenerator.Generate(now, seed))
        {
            var site = series.Site;
            await sites.DeleteAsync(site.Id, cancellationToken).ConfigureAwait(false);
            var created = await sites.CreateAsync(Record(site, now), cancellationToken).ConfigureAwait(false);
            if (!created)
            {
                throw new InvalidOperationException($"demo site {site.Id} could not be created");
            }
            foreach (var batch in series.Readings.Chunk(BatchSize))
            {
                var incoming = batch
                    .Select((r, i) => new IncomingReading(i, r.Time.ToUnixTimeMilliseconds(), r.ValueC, r.ValueC, "C"))
                    .ToList();
                await readings.IngestAsync(site.Id, incoming, ConflictPolicy.Replace, now, cancellationToken: cancellationToken).ConfigureAwait(false);
                total += incoming.Count;
            }
        }
        return new DemoLoadResult(DemoScenario.Sites.Count, total, stopwatch.Elapsed);
    }

    private static SiteRecord Record(DemoSiteProfile site, DateTimeOffset now) => new(
        site.Id,
        site.Name,
        DemoScenario.TimeZone,
        GridCadence.Hourly,
        null,
        null,
        null,
        site.ElevationM,
        site.Kind == DemoSiteKind.ColdStore ? new QualityLimits(MinC: -5, MaxC: 10) : QualityLimits.Default,
        ModelSettings.DefaultFor(GridCadence.Hourly),
        now,
        now)
    {
        Risk = SiteRiskSettings.Default with { Thresholds = Thresholds(site.Kind) },
    };

    // The levels each kind of site watches: frost for orchard and tunnel air, warming for the cold store.
    private static SiteThreshold[] Thresholds(DemoSiteKind kind) => kind switch
    {
        DemoSiteKind.ColdStore => [new SiteThreshold("too-warm", ThresholdDirection.Above, 5, 0.2)],
        DemoSiteKind.Tunnel => [new SiteThreshold("frost", ThresholdDirection.Below, 0, 0.3)],
        _ => [new SiteThreshold("frost", ThresholdDirection.Below, 0, 0.3), new SiteThreshold("hard-frost", ThresholdDirection.Below, -2, 0.2)],
    };
}
