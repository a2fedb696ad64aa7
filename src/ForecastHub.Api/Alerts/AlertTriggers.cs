using ForecastHub.Storage.Models;
using ForecastHub.Storage.Readings;

namespace ForecastHub.Api.Alerts;

/// <summary>The reading store as alerting sees it: new or replaced readings queue the site for evaluation.</summary>
public sealed class AlertingReadingStore(IReadingStore inner, AlertQueue queue) : IReadingStore
{
    public async Task<IngestResult?> IngestAsync(string siteId, IReadOnlyList<IncomingReading> readings, ConflictPolicy policy,
        DateTimeOffset receivedAt, CancellationToken cancellationToken = default)
    {
        var result = await inner.IngestAsync(siteId, readings, policy, receivedAt, cancellationToken);
        if (result is not null && result.Outcomes.Any(o => o.Kind is ReadingOutcomeKind.Accepted or ReadingOutcomeKind.Replaced))
        {
            queue.Enqueue(siteId);
        }

        return result;
    }

    public Task<IReadOnlyList<StoredReading>?> ReadAsync(string siteId, long fromMs, long toMs, long? afterMs, int limit,
        CancellationToken cancellationToken = default) =>
        inner.ReadAsync(siteId, fromMs, toMs, afterMs, limit, cancellationToken);

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
