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

/// <summary>Grid steps holding at least one unflagged reading, and the time of the newest such reading (null when none).</summary>
public sealed record StepsWithData(int Count, DateTimeOffset? LastAt);

public interface IReadingSummaryStore
{
    /// <summary>Null when the site does not exist; an empty summary when it has no readings.</summary>
    Task<ReadingSummary?> GetAsync(string siteId, CancellationToken cancellationToken = default);

    /// <summary>
    /// Grid steps since <paramref name="from"/> that hold at least one unflagged reading, counted
    /// in the index: steps of <paramref name="stepMs"/> shifted by <paramref name="offsetMs"/>
    /// (hourly: 3,600,000 and 0; daily: a day and the zone's standard offset), and the newest of
    /// those readings: what the refit decision and the warm-up rule need, without building the grid.
    /// </summary>
    Task<StepsWithData> CountStepsWithDataAsync(string siteId, DateTimeOffset from, long stepMs, long offsetMs, CancellationToken cancellationToken = default);
}
