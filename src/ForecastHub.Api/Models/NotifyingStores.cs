using ForecastHub.Api.Metrics;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Quality;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Models;

/// <summary>
/// The reading store as the service sees it: after readings are durable it bumps the site's data
/// version, counts the outcomes, and asks the refit queue to look at the site (never waiting for a fit).
/// The window row cache hears of the write before it starts and of what it wrote when it ends.
/// </summary>
public sealed class NotifyingReadingStore(IReadingStore inner, SiteVersions versions, RefitQueue queue, ServiceMetrics metrics, WindowRowCache fitWindows) : IReadingStore
{
    public async Task<IngestResult?> IngestAsync(string siteId, IReadOnlyList<IncomingReading> readings, ConflictPolicy policy,
        DateTimeOffset receivedAt, long? siteKey = null, CancellationToken cancellationToken = default)
    {
        IngestResult? result = null;
        var failed = true;
        fitWindows.WriteStarting(siteId);
        try
        {
            result = await inner.IngestAsync(siteId, readings, policy, receivedAt, siteKey, cancellationToken);
            failed = false;
        }
        finally
        {
            fitWindows.WriteEnded(siteId, result?.EarliestChangeMs, failed);
        }

        if (result is null)
        {
            return null;
        }

        foreach (var outcome in result.Outcomes)
        {
            var label = outcome.Kind switch
            {
                ReadingOutcomeKind.Accepted when outcome.Flags != QualityFlags.None => "flagged",
                ReadingOutcomeKind.Accepted => "accepted",
                ReadingOutcomeKind.Duplicate => "duplicate",
                ReadingOutcomeKind.Replaced => "replaced",
                _ => "rejected",
            };
            metrics.Readings.Inc(1, label);
        }

        if (result.Outcomes.Any(o => o.Kind is ReadingOutcomeKind.Accepted or ReadingOutcomeKind.Replaced))
        {
            versions.DataChanged(siteId);
            queue.Enqueue(siteId);
        }

        return result;
    }

    public Task<IReadOnlyList<StoredReading>?> ReadAsync(string siteId, long fromMs, long toMs, long? afterMs, int limit,
        CancellationToken cancellationToken = default) =>
        inner.ReadAsync(siteId, fromMs, toMs, afterMs, limit, cancellationToken);

    public Task<IReadOnlyList<GridReading>?> ReadGridAsync(string siteId, long fromMs, long toMs, CancellationToken cancellationToken = default) =>
        inner.ReadGridAsync(siteId, fromMs, toMs, cancellationToken);

    public Task<ReadingSpan?> SpanAsync(string siteId, CancellationToken cancellationToken = default) =>
        inner.SpanAsync(siteId, cancellationToken);
}

/// <summary>The site store as the service sees it: a settings change queues a refit; a deletion invalidates cached answers.</summary>
public sealed class NotifyingSiteStore(ISiteStore inner, SiteVersions versions, RefitQueue queue, ModelService models, WindowRowCache fitWindows) : ISiteStore
{
    public Task<bool> CreateAsync(SiteRecord site, CancellationToken cancellationToken = default) => inner.CreateAsync(site, cancellationToken);

    public Task<SiteRecord?> GetAsync(string id, CancellationToken cancellationToken = default) => inner.GetAsync(id, cancellationToken);

    public Task<IReadOnlyList<SiteRecord>> ListAsync(string? afterId, int limit, CancellationToken cancellationToken = default) =>
        inner.ListAsync(afterId, limit, cancellationToken);

    public async Task<SiteRecord?> UpdateAsync(string id, Func<SiteRecord, SiteRecord?> change, CancellationToken cancellationToken = default)
    {
        var before = await inner.GetAsync(id, cancellationToken);
        var after = await inner.UpdateAsync(id, change, cancellationToken);
        if (after is not null && before is not null && after.SettingsVersion != before.SettingsVersion)
        {
            versions.ModelChanged(id);
            queue.Enqueue(id);
        }

        return after;
    }

    public async Task<bool> DeleteAsync(string id, CancellationToken cancellationToken = default)
    {
        var deleted = await inner.DeleteAsync(id, cancellationToken);
        if (deleted)
        {
            // Bumping (not forgetting) keeps a re-created site with the same id from meeting old cached answers.
            models.Forget(id);
            fitWindows.Forget(id);
            versions.DataChanged(id);
            versions.ModelChanged(id);
        }

        return deleted;
    }
}
