using System.Buffers;

namespace ForecastHub.Core.Climatology;

/// <summary>
/// A fit's design columns, rented from a pool and given back when the fit ends. Ten years of hourly columns
/// are 7.7 MB, and memory new to the process costs a page fault per 4 KiB, which on a virtual machine costs
/// more than computing the columns. Rented columns may be longer than the window: their readers take the
/// leading rows only.
/// </summary>
internal static class PooledDesign
{
    // Room for the columns of a few fits at once; beyond it, columns are allocated and left to the collector.
    private static readonly ArrayPool<double> Pool = ArrayPool<double>.Create(maxArrayLength: 1 << 21, maxArraysPerBucket: 48);

    public static double[][] Rent(HarmonicDesign design, IReadOnlyList<DateTimeOffset> times)
    {
        var columns = new double[design.Columns][];
        for (var c = 0; c < columns.Length; c++)
        {
            columns[c] = Pool.Rent(times.Count);
        }

        design.FillColumns(times, columns);
        return columns;
    }

    public static void Return(double[][] columns)
    {
        foreach (var column in columns)
        {
            Pool.Return(column);
        }
    }
}
