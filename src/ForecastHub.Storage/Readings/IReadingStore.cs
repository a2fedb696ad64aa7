using ForecastHub.Core.Grid;

namespace ForecastHub.Storage.Readings;

/// <summary>Raw readings of a site.</summary>
public interface IReadingStore
{
    /// <summary>Stores what is new in one transaction and sets QC flags on the new readings and their
    /// stored neighbours. Null when the site does not exist, or when <paramref name="siteKey"/> is given and the
    /// site with the id now has another internal key (deleted and created again since the caller read it): nothing
    /// is stored then. When this returns, the readings are durable.</summary>
    Task<IngestResult?> IngestAsync(string siteId, IReadOnlyList<IncomingReading> readings, ConflictPolicy policy,
        DateTimeOffset receivedAt, long? siteKey = null, CancellationToken cancellationToken = default);

    /// <summary>Readings in [<paramref name="fromMs"/>, <paramref name="toMs"/>) in time order,
    /// starting after <paramref name="afterMs"/> (exclusive), at most <paramref name="limit"/>.
    /// Null when the site does not exist.</summary>
    Task<IReadOnlyList<StoredReading>?> ReadAsync(string siteId, long fromMs, long toMs, long? afterMs, int limit,
        CancellationToken cancellationToken = default);

    /// <summary>Every reading in [<paramref name="fromMs"/>, <paramref name="toMs"/>) in time order, with only what a
    /// grid needs (time, value in °C, whether QC flagged it), read in one snapshot. Null when the site does not exist.
    /// The list may hold pooled memory and be <see cref="IDisposable"/>: a caller done with it disposes it (reading it
    /// afterwards throws); one that does not leaves it to the collector.</summary>
    Task<IReadOnlyList<GridReading>?> ReadGridAsync(string siteId, long fromMs, long toMs, CancellationToken cancellationToken = default);

    /// <summary>First and last reading times; null when the site has no readings or does not exist.</summary>
    Task<ReadingSpan?> SpanAsync(string siteId, CancellationToken cancellationToken = default);
}
