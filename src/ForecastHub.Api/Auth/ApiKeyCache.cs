using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Auth;

/// <summary>
/// Verified keys by secret digest for <c>Auth:KeyCacheSeconds</c>, so a busy client does not cost a
/// database read per request. Only keys that verified are cached (a new key works at once), and
/// revoking a key through the API evicts it before the revocation answers. A lookup that started
/// before a revocation is not cached afterwards (the generation check), so no stale entry survives.
/// </summary>
public sealed class ApiKeyCache(TimeProvider clock, IOptionsMonitor<AuthOptions> options)
{
    // Bounded: every entry is a real key, and the whole cache is dropped if keys outnumber this.
    private const int MaxEntries = 10_000;

    private readonly Lock _gate = new();
    private readonly Dictionary<string, Entry> _entries = new(StringComparer.Ordinal);
    private long _generation;

    /// <summary>Read before a database lookup and handed to <see cref="Add"/>.</summary>
    public long Generation
    {
        get
        {
            lock (_gate)
            {
                return _generation;
            }
        }
    }

    public ApiKeyIdentity? Find(byte[] digest)
    {
        var key = Convert.ToHexString(digest);
        lock (_gate)
        {
            if (!_entries.TryGetValue(key, out var entry))
            {
                return null;
            }
            if (entry.ExpiresAt > clock.GetUtcNow())
            {
                return entry.Identity;
            }
            _entries.Remove(key);
            return null;
        }
    }

    public void Add(byte[] digest, ApiKeyIdentity identity, long generationAtLookup)
    {
        var lifetime = TimeSpan.FromSeconds(options.CurrentValue.KeyCacheSeconds);
        if (lifetime <= TimeSpan.Zero)
        {
            return;
        }
        lock (_gate)
        {
            if (generationAtLookup != _generation)
            {
                return;
            }
            if (_entries.Count >= MaxEntries)
            {
                _entries.Clear();
            }
            _entries[Convert.ToHexString(digest)] = new Entry(identity, clock.GetUtcNow() + lifetime);
        }
    }

    public void Evict(string keyId)
    {
        lock (_gate)
        {
            _generation++;
            foreach (var stale in _entries.Where(e => e.Value.Identity.KeyId == keyId).Select(e => e.Key).ToList())
            {
                _entries.Remove(stale);
            }
        }
    }

    /// <summary>Drops every entry: used when revocations made elsewhere may have been missed.</summary>
    public void Clear()
    {
        lock (_gate)
        {
            _generation++;
            _entries.Clear();
        }
    }

    private sealed record Entry(ApiKeyIdentity Identity, DateTimeOffset ExpiresAt);
}
