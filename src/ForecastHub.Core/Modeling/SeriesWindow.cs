using ForecastHub.Core.Grid;

namespace ForecastHub.Core.Modeling;

/// <summary>The grid points a fit uses, compacted (gaps removed) with segment runs into the compact arrays.</summary>
internal sealed class SeriesWindow
{
    private SeriesWindow(DateTimeOffset[] times, double[] values, bool[] interpolated, (int Start, int Length)[] segments)
    {
        Times = times;
        Values = values;
        Interpolated = interpolated;
        Segments = segments;
    }

    public DateTimeOffset[] Times { get; }

    public double[] Values { get; }

    public bool[] Interpolated { get; }

    public (int Start, int Length)[] Segments { get; }

    public int Count => Values.Length;

    /// <summary>Segments of the grid clipped to the days before its newest value.</summary>
    public static SeriesWindow FromGrid(TimeGrid grid, int windowDays)
    {
        var last = grid.LastValueIndex;
        var from = grid.Times[last].AddDays(-windowDays);
        var times = new List<DateTimeOffset>(grid.Count);
        var values = new List<double>(grid.Count);
        var interpolated = new List<bool>(grid.Count);
        var segments = new List<(int, int)>();
        foreach (var s in grid.Segments)
        {
            var start = times.Count;
            for (var i = s.Start; i < s.Start + s.Length; i++)
            {
                if (grid.Times[i] > from)
                {
                    times.Add(grid.Times[i]);
                    values.Add(grid.Values[i]);
                    interpolated.Add(grid.Interpolated[i]);
                }
            }

            if (times.Count > start)
            {
                segments.Add((start, times.Count - start));
            }
        }

        return new SeriesWindow([.. times], [.. values], [.. interpolated], [.. segments]);
    }

    /// <summary>The first <paramref name="count"/> points.</summary>
    public SeriesWindow Prefix(int count)
    {
        var segments = Segments.Where(s => s.Start < count).Select(s => (s.Start, Math.Min(s.Length, count - s.Start))).ToArray();
        return new SeriesWindow(Times[..count], Values[..count], Interpolated[..count], segments);
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
