using ForecastHub.Core.Quality;

namespace ForecastHub.Storage.Readings;

/// <summary>A validated reading on its way in: UTC time in milliseconds, value converted to degrees
/// C, and what the logger sent. <c>Index</c> is its position in the request.</summary>
public readonly record struct IncomingReading(int Index, long TimeMs, double ValueC, double OriginalValue, string OriginalUnit);

/// <summary>A stored reading.</summary>
public readonly record struct StoredReading(long TimeMs, double ValueC, double OriginalValue, string OriginalUnit, QualityFlags Flags)
{
    public DateTimeOffset Time => DateTimeOffset.FromUnixTimeMilliseconds(TimeMs);
}

/// <summary>What a sent value does when another value is stored for the same time.</summary>
public enum ConflictPolicy
{
    Reject,
    Replace,
}

public enum ReadingOutcomeKind
{
    Accepted,
    Duplicate,
    Replaced,
    Conflict,
}

/// <summary>The outcome of one incoming reading. <c>Flags</c> are its QC flags once stored;
/// <c>StoredValueC</c> is the value that was already there (duplicates and conflicts).</summary>
public readonly record struct ReadingOutcome(ReadingOutcomeKind Kind, QualityFlags Flags, double? StoredValueC);

/// <summary>Outcomes in the order of the incoming readings.</summary>
public sealed record IngestResult(IReadOnlyList<ReadingOutcome> Outcomes)
{
    /// <summary>The earliest reading time the ingest wrote: a new or replaced reading, or a stored neighbour given a
    /// spike or flat-line flag by it. Null when nothing was written. Rows before it are as they were.</summary>
    public long? EarliestChangeMs { get; init; }
}
