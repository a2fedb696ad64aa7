namespace ForecastHub.Storage.Health;

/// <summary>
/// What the health rules need from a site's readings, answered from the index without reading
/// the history: the newest reading, its QC flags, and the counts of the 24 hours that end at it.
/// </summary>
public sealed record ReadingSummary(
    DateTimeOffset? LastObservationAt,
    int LastFlags,
    int LastDayReadings,
    int LastDayFlagged);

public interface IReadingSummaryStore
{
    /// <summary>Null when the site does not exist; an empty summary when it has no readings.</summary>
    Task<ReadingSummary?> GetAsync(string siteId, CancellationToken cancellationToken = default);

    /// <summary>
    /// Grid steps since <paramref name="from"/> that hold at least one unflagged reading, counted
    /// in the index: steps of <paramref name="stepMs"/> shifted by <paramref name="offsetMs"/>
    /// (hourly: 3,600,000 and 0; daily: a day and the zone's standard offset).
    /// </summary>
    Task<int> CountStepsWithDataAsync(string siteId, DateTimeOffset from, long stepMs, long offsetMs, CancellationToken cancellationToken = default);
}
