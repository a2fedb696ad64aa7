namespace ForecastHub.Core.Grid;

/// <summary>Step of a site's regular grid.</summary>
public enum GridCadence
{
    Hourly,
    Daily,
}

/// <summary>Statistic of a daily grid, computed over the local calendar day.</summary>
public enum DailyStatistic
{
    Mean,
    Min,
    Max,
}

/// <summary>A stored reading in degrees C; flagged readings are left out of the grid.</summary>
public readonly record struct GridReading(DateTimeOffset Time, double ValueC, bool Flagged = false);

/// <summary>How readings become a grid. <paramref name="MaxInterpolatedGap"/> is the longest run of
/// missing steps that is filled by linear interpolation (default 3).</summary>
public sealed record GridOptions(
    GridCadence Cadence,
    string TimeZone,
    DailyStatistic DailyStatistic = DailyStatistic.Mean,
    int MaxInterpolatedGap = 3);

/// <summary>A maximal run of grid points that all carry a value (observed or interpolated);
/// <c>Start</c> is an index into the grid arrays.</summary>
public sealed record GridSegment(int Start, int Length, DateTimeOffset From, DateTimeOffset To);

/// <summary>A run of missing steps: filled when <c>Interpolated</c>, otherwise a break between segments
/// (or a missing head or tail of the requested span).</summary>
public sealed record GridGap(int Start, int Length, DateTimeOffset From, DateTimeOffset To, bool Interpolated);

/// <summary>
/// A site's regular grid. <c>Times[i]</c> is the start of step i (hourly: a UTC hour; daily: the
/// local midnight that starts the local day, with that day's offset). <c>Values[i]</c> is NaN where
/// the step is missing and was not interpolated; <c>Interpolated[i]</c> marks filled steps.
/// </summary>
public sealed record TimeGrid(
    GridCadence Cadence,
    string TimeZone,
    DateTimeOffset[] Times,
    double[] Values,
    bool[] Interpolated,
    GridSegment[] Segments,
    GridGap[] Gaps)
{
    public int Count => Times.Length;

    /// <summary>Steps carrying an observed (not interpolated) value.</summary>
    public int ObservedCount => Values.Where((v, i) => !double.IsNaN(v) && !Interpolated[i]).Count();

    public int InterpolatedCount => Interpolated.Count(x => x);

    /// <summary>Index of the newest step with a value, or -1 when there is none.</summary>
    public int LastValueIndex => Array.FindLastIndex(Values, v => !double.IsNaN(v));

    /// <summary>
    /// The grid as it was known at step <paramref name="lastIndex"/>: later steps dropped, and
    /// interpolated steps after the last observed one set back to missing (they used later data).
    /// </summary>
    public TimeGrid Until(int lastIndex)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(lastIndex);
        ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual(lastIndex, Count);
        var n = lastIndex + 1;
        var values = Values[..n];
        var interpolated = Interpolated[..n];
        for (var i = n - 1; i >= 0 && (interpolated[i] || double.IsNaN(values[i])); i--)
        {
            values[i] = double.NaN;
            interpolated[i] = false;
        }

        var segments = Segments.Where(s => s.Start < n && !double.IsNaN(values[s.Start]))
            .Select(s =>
            {
                var end = Math.Min(s.Start + s.Length, n);
                while (double.IsNaN(values[end - 1]))
                {
                    end--;
                }

                return s with { Length = end - s.Start, To = Times[end - 1] };
            })
            .ToArray();
        return this with { Times = Times[..n], Values = values, Interpolated = interpolated, Segments = segments, Gaps = [.. Gaps.Where(g => g.Start < n).Select(g => g with { Length = Math.Min(g.Length, n - g.Start) })] };
    }

    /// <summary>The values of each segment, in time order (what the model fit uses).</summary>
    public IReadOnlyList<double[]> SegmentValues() =>
        Segments.Select(s => Values.AsSpan(s.Start, s.Length).ToArray()).ToArray();
}
