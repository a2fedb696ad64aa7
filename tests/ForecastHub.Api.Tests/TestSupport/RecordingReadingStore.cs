using System.Collections.Concurrent;
using ForecastHub.Core.Grid;
using ForecastHub.Storage.Readings;

namespace ForecastHub.Api.Tests.TestSupport;

/// <summary>A real reading store, with the ranges of its grid reads written down.</summary>
public sealed class RecordingReadingStore(IReadingStore inner, ConcurrentQueue<(long FromMs, long ToMs)> reads) : IReadingStore
{
    public Task<IngestResult?> IngestAsync(string siteId, IReadOnlyList<IncomingReading> readings, ConflictPolicy policy,
        DateTimeOffset receivedAt, long? siteKey = null, CancellationToken cancellationToken = default) =>
        inner.IngestAsync(siteId, readings, policy, receivedAt, siteKey, cancellationToken);

    public Task<IReadOnlyList<StoredReading>?> ReadAsync(string siteId, long fromMs, long toMs, long? afterMs, int limit, CancellationToken cancellationToken = default) =>
        inner.ReadAsync(siteId, fromMs, toMs, afterMs, limit, cancellationToken);

    public Task<IReadOnlyList<GridReading>?> ReadGridAsync(string siteId, long fromMs, long toMs, CancellationToken cancellationToken = default)
    {
        reads.Enqueue((fromMs, toMs));
        return inner.ReadGridAsync(siteId, fromMs, toMs, cancellationToken);
    }

    public Task<ReadingSpan?> SpanAsync(string siteId, CancellationToken cancellationToken = default) => inner.SpanAsync(siteId, cancellationToken);
}
