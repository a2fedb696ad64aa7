using System.Buffers;
using ForecastHub.Core.Grid;

namespace ForecastHub.Core.Modeling;

/// <summary>The grid points a fit uses, compacted (gaps removed) with segment runs into the compact arrays.</summary>
internal sealed class SeriesWindow
{
    // Times and marks may be rented (longer than the window) or shared with the window this is a prefix of.
    private readonly DateTimeOffset[] timesArray;
    private readonly bool[] interpolatedArray;
    private readonly bool pooled;

    private SeriesWindow(DateTimeOffset[] times, double[] values, bool[] interpolated, (int Start, int Length)[] segments, bool pooled = false)
    {
        timesArray = times;
        interpolatedArray = interpolated;
        Values = values;
        Segments = segments;
        this.pooled = pooled;
    }

    /// <summary>The points' times, <see cref="Count"/> of them.</summary>
    public ArraySegment<DateTimeOffset> Times => new(timesArray, 0, Count);

    /// <summary>The points' values, <see cref="Count"/> of them.</summary>
    public double[] Values { get; }

    /// <summary>Whether each point was interpolated, <see cref="Count"/> of them.</summary>
    public ArraySegment<bool> Interpolated => new(interpolatedArray, 0, Count);

    public (int Start, int Length)[] Segments { get; }

    public int Count => Values.Length;

    /// <summary>Segments of the grid clipped to the days before its newest value.</summary>
    public static SeriesWindow FromGrid(TimeGrid grid, int windowDays)
    {
        var last = grid.LastValueIndex;
        var from = grid.Times[last].AddDays(-windowDays);

        // Counted first, so the values are allocated once at their size; times and marks are rented (ten hourly years of
        // times are 1.4 MB, and memory new to the process costs a page fault per 4 KiB) and given back by ReturnPooled.
        var count = 0;
        foreach (var s in grid.Segments)
        {
            for (var i = s.Start; i < s.Start + s.Length; i++)
            {
                count += grid.Times[i] > from ? 1 : 0;
            }
        }

        var times = ArrayPool<DateTimeOffset>.Shared.Rent(count);
        var values = new double[count];
        var interpolated = ArrayPool<bool>.Shared.Rent(count);
        var segments = new List<(int, int)>();
        var n = 0;
        foreach (var s in grid.Segments)
        {
            var start = n;
            for (var i = s.Start; i < s.Start + s.Length; i++)
            {
                if (grid.Times[i] > from)
                {
                    times[n] = grid.Times[i];
                    values[n] = grid.Values[i];
                    interpolated[n] = grid.Interpolated[i];
                    n++;
                }
            }

            if (n > start)
            {
                segments.Add((start, n - start));
            }
        }

        return new SeriesWindow(times, values, interpolated, [.. segments], pooled: true);
    }

    /// <summary>Gives the rented times and marks back: the fit that made this window is done with it and its prefixes.</summary>
    public void ReturnPooled()
    {
        if (pooled)
        {
            ArrayPool<DateTimeOffset>.Shared.Return(timesArray);
            ArrayPool<bool>.Shared.Return(interpolatedArray);
        }
    }

    /// <summary>The first <paramref name="count"/> points; their times and interpolation marks are read from this window's arrays.</summary>
    public SeriesWindow Prefix(int count)
    {
        var segments = Segments.Where(s => s.Start < count).Select(s => (s.Start, Math.Min(s.Length, count - s.Start))).ToArray();
        return new SeriesWindow(timesArray, Values[..count], interpolatedArray, segments);
    }

    /// <summary>The series cut into the window's segments; a window in one piece gives the series itself, uncopied
    /// (the fitting code reads segments and never writes them).</summary>
    public double[][] Split(double[] series) =>
        Segments is [var only] && only.Start == 0 && only.Length == series.Length
            ? [series]
            : Segments.Select(s => series[s.Start..(s.Start + s.Length)]).ToArray();

    /// <summary>Index of the segment holding point i.</summary>
    public int SegmentOf(int i)
    {
        for (var s = 0; s < Segments.Length; s++)
        {
            if (i >= Segments[s].Start && i < Segments[s].Start + Segments[s].Length)
            {
                return s;
            }
        }

        return -1;
    }
}
