using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Sites;

/// <summary>
/// Site records in memory, so a busy read (a forecast served from the cache) costs no database read.
/// Every change or deletion through this store drops the site's entry after it is written, and a
/// read that started before a change is not cached afterwards (the generation check), so no stale
/// record survives a change. Changes made by other nodes (PostgreSQL) arrive as change notices that
/// call <see cref="Forget"/>. Bounded: the whole cache is dropped when sites outnumber the cap.
/// </summary>
public sealed class CachedSiteStore(ISiteStore inner) : ISiteStore
{
    public const int MaxEntries = 100_000;

    private readonly Lock gate = new();
    private readonly Dictionary<string, SiteRecord> entries = new(StringComparer.Ordinal);
    private long generation;

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

    public async Task<bool> CreateAsync(SiteRecord site, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(site);
        var created = await inner.CreateAsync(site, cancellationToken);
        Invalidate(site.Id);
        return created;
    }

    public async Task<SiteRecord?> GetAsync(string id, CancellationToken cancellationToken = default)
    {
        long seen;
        lock (gate)
        {
            if (entries.TryGetValue(id, out var cached))
            {
                return cached;
            }

            seen = generation;
        }

        var site = await inner.GetAsync(id, cancellationToken);
        if (site is not null)
        {
            lock (gate)
            {
                if (seen == generation)
                {
                    if (entries.Count >= MaxEntries)
                    {
                        entries.Clear();
                    }

                    entries[id] = site;
                }
            }
        }

        return site;
    }

    public Task<IReadOnlyList<SiteRecord>> ListAsync(string? afterId, int limit, CancellationToken cancellationToken = default) =>
        inner.ListAsync(afterId, limit, cancellationToken);

    public async Task<SiteRecord?> UpdateAsync(string id, Func<SiteRecord, SiteRecord?> change, CancellationToken cancellationToken = default)
    {
        try
        {
            return await inner.UpdateAsync(id, change, cancellationToken);
        }
        finally
        {
            Invalidate(id);
        }
    }

    public async Task<bool> DeleteAsync(string id, CancellationToken cancellationToken = default)
    {
        try
        {
            return await inner.DeleteAsync(id, cancellationToken);
        }
        finally
        {
            Invalidate(id);
        }
    }

    /// <summary>Drops the site's entry (a change made elsewhere), or every entry when <paramref name="id"/> is null.</summary>
    public void Forget(string? id)
    {
        if (id is null)
        {
            lock (gate)
            {
                generation++;
                entries.Clear();
            }

            return;
        }

        Invalidate(id);
    }

    private void Invalidate(string id)
    {
        lock (gate)
        {
            generation++;
            entries.Remove(id);
        }
    }
}
