using System.Runtime.CompilerServices;
using ForecastHub.Core.Grid;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Models;

/// <summary>
/// The rows of the fit windows read last, kept so that the next refit of a site reads only the rows after them: a refit
/// after a new hourly reading otherwise reads ten years of unchanged rows again, which costs more than its fit.
/// An entry holds every stored row of its site from its start to its last row. It is dropped when a write may have
/// changed a row at or before that last row (<see cref="WriteEnded"/>), when the site is deleted or changed by another
/// node (<see cref="Forget"/>), and least recently used first beyond the size limit (<c>Refit:WindowCacheMegabytes</c>).
/// A window read from storage is kept the second time its site misses: a sweep that fits every site once copies nothing.
/// A read that overlaps a write on this node is served from storage alone: the write may commit between the check
/// and the read of the newer rows. Writes from other nodes are seen only after they commit, so the cache is off on
/// PostgreSQL (docs/service.md, "Window row cache").
/// </summary>
public sealed class WindowRowCache(long maxBytes)
{
    private static readonly int RowBytes = Unsafe.SizeOf<GridReading>();

    private readonly Lock gate = new();
    private readonly Dictionary<string, Entry> entries = new(StringComparer.Ordinal);
    private readonly Dictionary<string, int> writesInProgress = new(StringComparer.Ordinal);
    private readonly List<Watch> watches = [];
    // Sites whose window was read from storage once and not kept; bounded, as a sweep meets every site.
    private readonly HashSet<string> missedOnce = new(StringComparer.Ordinal);
    private const int MaxMissesRemembered = 100_000;
    private long bytes;
    private long clock;

    /// <summary>The reader of stored rows in [from, to) the cache stands in front of; null when the site does not exist.</summary>
    public delegate Task<IReadOnlyList<GridReading>?> RowReader(long fromMs, long toMs, CancellationToken cancellationToken);

    public bool Enabled => maxBytes > 0;

    /// <summary>Sites held now.</summary>
    public int Count
    {
        get
        {
            lock (gate)
            {
                return entries.Count;
            }
        }
    }

    /// <summary>Memory the rows held take now.</summary>
    public long HeldBytes
    {
        get
        {
            lock (gate)
            {
                return bytes;
            }
        }
    }

    /// <summary>Called before a write of the site's readings starts; reads until it ends go to storage.</summary>
    public void WriteStarting(string siteId)
    {
        if (!Enabled)
        {
            return;
        }

        lock (gate)
        {
            writesInProgress[siteId] = writesInProgress.GetValueOrDefault(siteId) + 1;
            Disturb(siteId);
        }
    }

    /// <summary>Called when the write ends, with the earliest time it wrote (null when it wrote nothing); <paramref name="failed"/>
    /// when it threw, so what it wrote is unknown and the entry goes.</summary>
    public void WriteEnded(string siteId, long? earliestChangeMs, bool failed)
    {
        if (!Enabled)
        {
            return;
        }

        lock (gate)
        {
            var left = writesInProgress.GetValueOrDefault(siteId) - 1;
            if (left > 0)
            {
                writesInProgress[siteId] = left;
            }
            else
            {
                writesInProgress.Remove(siteId);
            }

            Disturb(siteId);
            if (entries.TryGetValue(siteId, out var entry) && (failed || earliestChangeMs <= entry.LastMs))
            {
                Remove(siteId, entry);
            }
        }
    }

    /// <summary>Drops what is held for the site (null: every site), whose rows may have changed in a way not seen here.</summary>
    public void Forget(string? siteId)
    {
        lock (gate)
        {
            foreach (var (id, entry) in entries.ToArray())
            {
                if (siteId is null || id == siteId)
                {
                    Remove(id, entry);
                }
            }

            foreach (var watch in watches)
            {
                if (siteId is null || watch.SiteId == siteId)
                {
                    watch.Disturbed = true;
                }
            }

            if (siteId is null)
            {
                missedOnce.Clear();
            }
            else
            {
                missedOnce.Remove(siteId);
            }
        }
    }

    /// <summary>
    /// The site's stored rows in [<paramref name="fromMs"/>, <paramref name="toMs"/>) in time order, as <paramref name="read"/> gives
    /// them: from the entry held plus the rows after its last one when it covers the start, else from storage (and then held).
    /// A list from storage may be pooled memory (SiteGridLoader.Release); a list from the entry is a view that stays valid.
    /// </summary>
    public async Task<IReadOnlyList<GridReading>?> ReadAsync(SiteRecord site, long fromMs, long toMs, RowReader read, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(site);
        ArgumentNullException.ThrowIfNull(read);
        if (!Enabled)
        {
            return await read(fromMs, toMs, cancellationToken);
        }

        Entry? held;
        Watch watch;
        lock (gate)
        {
            watch = new Watch(site.Id) { Disturbed = writesInProgress.ContainsKey(site.Id) };
            watches.Add(watch);
            // Taken out while in use, so a read running beside this one never appends to the same array.
            held = entries.TryGetValue(site.Id, out var entry) && !watch.Disturbed && entry.SiteKey == site.Key && entry.FromMs <= fromMs
                ? entry : null;
            if (held is not null)
            {
                Remove(site.Id, held);
            }
        }

        try
        {
            if (held is not null && await ReadNewerAsync(held, fromMs, toMs, read, watch, cancellationToken) is { } rows)
            {
                Keep(site.Id, held, watch);
                return rows;
            }

            var stored = await read(fromMs, toMs, cancellationToken);
            if (stored is not null && MissedBefore(site.Id))
            {
                Keep(site.Id, Entry.Copy(site.Key, fromMs, stored), watch);
            }

            return stored;
        }
        finally
        {
            lock (gate)
            {
                watches.Remove(watch);
            }
        }
    }

    /// <summary>Appends the rows after the entry's last one up to <paramref name="toMs"/> and gives the entry's rows in the range;
    /// null when a write or a forget came between, so the rows may mix states.</summary>
    private static async Task<IReadOnlyList<GridReading>?> ReadNewerAsync(Entry held, long fromMs, long toMs, RowReader read, Watch watch, CancellationToken cancellationToken)
    {
        var newer = await read(Math.Max(held.LastMs + 1, fromMs), toMs, cancellationToken);
        try
        {
            if (newer is null || watch.Disturbed)
            {
                return null;
            }

            held.Append(newer, fromMs);
            return held.Range(fromMs, toMs);
        }
        finally
        {
            SiteGridLoader.Release(newer);
        }
    }

    /// <summary>True when the site's window was read from storage before (and not kept); else remembers this read.</summary>
    private bool MissedBefore(string siteId)
    {
        lock (gate)
        {
            if (missedOnce.Remove(siteId))
            {
                return true;
            }

            if (missedOnce.Count >= MaxMissesRemembered)
            {
                missedOnce.Clear();
            }

            missedOnce.Add(siteId);
            return false;
        }
    }

    private void Keep(string siteId, Entry entry, Watch watch)
    {
        lock (gate)
        {
            if (watch.Disturbed || entry.Bytes(RowBytes) > maxBytes)
            {
                return;
            }

            if (entries.Remove(siteId, out var other))
            {
                bytes -= other.Bytes(RowBytes);
            }

            entry.LastUsed = ++clock;
            entries[siteId] = entry;
            bytes += entry.Bytes(RowBytes);
            while (bytes > maxBytes)
            {
                var (victim, oldest) = entries.MinBy(e => e.Value.LastUsed);
                Remove(victim, oldest);
            }
        }
    }

    private void Remove(string siteId, Entry entry)
    {
        entries.Remove(siteId);
        bytes -= entry.Bytes(RowBytes);
    }

    private void Disturb(string siteId)
    {
        foreach (var watch in watches)
        {
            if (watch.SiteId == siteId)
            {
                watch.Disturbed = true;
            }
        }
    }

    /// <summary>A read in progress: set when a write or forget of its site came while it ran.</summary>
    private sealed class Watch(string siteId)
    {
        public string SiteId { get; } = siteId;

        public volatile bool Disturbed;
    }

    /// <summary>Every stored row of the site in [FromMs, LastMs], in time order, in rows[0..count); room after count for appends.
    /// Views handed out earlier read only below the count they were given, so appending in place never changes them.</summary>
    private sealed class Entry(long siteKey, long fromMs, GridReading[] rows, int count)
    {
        private GridReading[] rows = rows;
        private int count = count;

        public long SiteKey { get; } = siteKey;

        public long FromMs { get; private set; } = fromMs;

        /// <summary>The last row's time; before the start when there is none.</summary>
        public long LastMs => count > 0 ? rows[count - 1].Time.ToUnixTimeMilliseconds() : FromMs - 1;

        public long LastUsed { get; set; }

        public long Bytes(int rowBytes) => (long)rows.Length * rowBytes;

        public static Entry Copy(long siteKey, long fromMs, IReadOnlyList<GridReading> stored)
        {
            var rows = new GridReading[Room(stored.Count)];
            for (var i = 0; i < stored.Count; i++)
            {
                rows[i] = stored[i];
            }

            return new Entry(siteKey, fromMs, rows, stored.Count);
        }

        /// <summary>Adds rows later than the last one; when the array is full, moves the rows from <paramref name="fromMs"/> on to a new one.</summary>
        public void Append(IReadOnlyList<GridReading> newer, long fromMs)
        {
            if (count + newer.Count > rows.Length)
            {
                var start = IndexOf(fromMs);
                var moved = new GridReading[Room(count - start + newer.Count)];
                Array.Copy(rows, start, moved, 0, count - start);
                (rows, count, FromMs) = (moved, count - start, Math.Max(FromMs, fromMs));
            }

            for (var i = 0; i < newer.Count; i++)
            {
                rows[count + i] = newer[i];
            }

            count += newer.Count;
        }

        public ArraySegment<GridReading> Range(long fromMs, long toMs)
        {
            var start = IndexOf(fromMs);
            return new ArraySegment<GridReading>(rows, start, IndexOf(toMs) - start);
        }

        /// <summary>The first row at or after the time (count when none).</summary>
        private int IndexOf(long timeMs)
        {
            int lo = 0, hi = count;
            while (lo < hi)
            {
                var mid = (lo + hi) >>> 1;
                if (rows[mid].Time.ToUnixTimeMilliseconds() < timeMs)
                {
                    lo = mid + 1;
                }
                else
                {
                    hi = mid;
                }
            }

            return lo;
        }

        // Room for about a month of hourly appends before the rows move.
        private static int Room(int rows) => rows + Math.Max(1024, rows / 64);
    }
}
