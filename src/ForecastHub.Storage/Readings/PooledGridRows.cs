using System.Buffers;
using System.Collections;
using ForecastHub.Core.Grid;

namespace ForecastHub.Storage.Readings;

/// <summary>
/// Grid rows in an array rented from a pool kept for grid reads; <see cref="Dispose"/> gives the array back. A refit
/// reads ten years of rows (5 MB with its time slices), and memory new to the process costs a page fault per 4 KiB
/// (about 12 us each on this project's virtual machines, more than SQLite's own scan). A caller that never disposes
/// leaves the array to the collector. Reading after <see cref="Dispose"/> throws.
/// </summary>
public sealed class PooledGridRows : IReadOnlyList<GridReading>, IDisposable
{
    // Arrays up to 4 Mi rows (128 MB); a few per size, for fits and forecasts running at once. Never trimmed: kept
    // arrays stay committed, which is the point.
    private static readonly ArrayPool<GridReading> Pool = ArrayPool<GridReading>.Create(maxArrayLength: 1 << 22, maxArraysPerBucket: 8);

    private GridReading[]? rows;

    private PooledGridRows(GridReading[] rows, int count)
    {
        this.rows = rows;
        Count = count;
    }

    public int Count { get; }

    public GridReading this[int index]
    {
        get
        {
            ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual((uint)index, (uint)Count, nameof(index));
            return Rows[index];
        }
    }

    private GridReading[] Rows => rows ?? throw new ObjectDisposedException(nameof(PooledGridRows));

    /// <summary>An array of at least <paramref name="length"/> rows from the pool; not cleared.</summary>
    internal static GridReading[] Rent(int length) => Pool.Rent(length);

    internal static void Return(GridReading[] array) => Pool.Return(array);

    /// <summary>Takes over <paramref name="rented"/> (from <see cref="Rent"/>), of which the first <paramref name="count"/> rows are read.</summary>
    internal static PooledGridRows Of(GridReading[] rented, int count) => new(rented, count);

    /// <summary>The parts (each in a rented array) joined in order into one rented array; the parts' arrays go back to the pool.</summary>
    internal static PooledGridRows Join(ArraySegment<GridReading>[] parts)
    {
        if (parts.Length == 1)
        {
            return Of(parts[0].Array!, parts[0].Count);
        }

        var all = Rent(Math.Max(1, parts.Sum(p => p.Count)));
        var at = 0;
        foreach (var part in parts)
        {
            part.CopyTo(all, at);
            at += part.Count;
            Return(part.Array!);
        }

        return Of(all, at);
    }

    public IEnumerator<GridReading> GetEnumerator()
    {
        var array = Rows;
        for (var i = 0; i < Count; i++)
        {
            yield return array[i];
        }
    }

    IEnumerator IEnumerable.GetEnumerator() => GetEnumerator();

    public void Dispose()
    {
        var array = Interlocked.Exchange(ref rows, null);
        if (array is not null)
        {
            Pool.Return(array);
        }
    }
}
