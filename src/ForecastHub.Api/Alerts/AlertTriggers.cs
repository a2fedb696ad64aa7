using ForecastHub.Core.Grid;
using ForecastHub.Core.Risk;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Alerts;

/// <summary>The reading store as alerting sees it: new or replaced readings queue the site for evaluation.</summary>
public sealed class AlertingReadingStore(IReadingStore inner, AlertQueue queue) : IReadingStore
{
    public async Task<IngestResult?> IngestAsync(string siteId, IReadOnlyList<IncomingReading> readings, ConflictPolicy policy,
        DateTimeOffset receivedAt, long? siteKey = null, CancellationToken cancellationToken = default)
    {
        var result = await inner.IngestAsync(siteId, readings, policy, receivedAt, siteKey, cancellationToken);
        if (result is not null && result.Outcomes.Any(o => o.Kind is ReadingOutcomeKind.Accepted or ReadingOutcomeKind.Replaced))
        {
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

/// <summary>The model store as alerting sees it: a stored fit (or a failed one, which can change health) queues the site.</summary>
public sealed class AlertingModelStore(IModelStore inner, AlertQueue queue) : IModelStore
{
    public Task<StoredModel?> GetAsync(string siteId, CancellationToken cancellationToken = default) => inner.GetAsync(siteId, cancellationToken);

    public async Task<bool> SaveAsync(StoredModel model, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(model);
        var saved = await inner.SaveAsync(model, cancellationToken);
        if (saved)
        {
            queue.Enqueue(model.SiteId);
        }

        return saved;
    }

    public async Task<bool> RecordFailureAsync(FitAttempt attempt, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(attempt);
        var recorded = await inner.RecordFailureAsync(attempt, cancellationToken);
        if (recorded)
        {
            queue.Enqueue(attempt.SiteId);
        }

        return recorded;
    }

    public Task<FitAttempt?> GetLastAttemptAsync(string siteId, CancellationToken cancellationToken = default) =>
        inner.GetLastAttemptAsync(siteId, cancellationToken);

    public Task<IReadOnlyList<ModelSummary>> ListSummariesAsync(CancellationToken cancellationToken = default) =>
        inner.ListSummariesAsync(cancellationToken);

    public Task<ModelSummary?> GetSummaryAsync(string siteId, CancellationToken cancellationToken = default) =>
        inner.GetSummaryAsync(siteId, cancellationToken);
}

/// <summary>The site store as alerting sees it: a change of thresholds or night hours queues the site, so risk is re-evaluated at once.</summary>
public sealed class AlertingSiteStore(ISiteStore inner, AlertQueue queue) : ISiteStore
{
    public Task<bool> CreateAsync(SiteRecord site, CancellationToken cancellationToken = default) => inner.CreateAsync(site, cancellationToken);

    public Task<SiteRecord?> GetAsync(string id, CancellationToken cancellationToken = default) => inner.GetAsync(id, cancellationToken);

    public Task<IReadOnlyList<SiteRecord>> ListAsync(string? afterId, int limit, CancellationToken cancellationToken = default) =>
        inner.ListAsync(afterId, limit, cancellationToken);

    public async Task<SiteRecord?> UpdateAsync(string id, Func<SiteRecord, SiteRecord?> change, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(change);
        SiteRiskSettings? before = null;
        var after = await inner.UpdateAsync(id, site =>
        {
            before = site.Risk;
            return change(site);
        }, cancellationToken);
        if (after is not null && before is not null && !after.Risk.Equals(before))
        {
            queue.Enqueue(id);
        }

        return after;
    }

    public Task<bool> DeleteAsync(string id, CancellationToken cancellationToken = default) => inner.DeleteAsync(id, cancellationToken);
}
