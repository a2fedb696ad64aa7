using System.Collections.Concurrent;

namespace ForecastHub.Api.Models;

/// <summary>
/// In-memory versions per site that cached answers are keyed on: the data version goes up when
/// readings are stored, the model version when a model is saved, a fit fails or a day is scored.
/// A restart starts every version afresh, and the caches start empty with them.
/// </summary>
public sealed class SiteVersions
{
    private readonly ConcurrentDictionary<string, Versions> versions = new(StringComparer.Ordinal);

    public (long Data, long Model) Get(string siteId) =>
        versions.TryGetValue(siteId, out var v) ? (Interlocked.Read(ref v.Data), Interlocked.Read(ref v.Model)) : (0, 0);

    public void DataChanged(string siteId) => Interlocked.Increment(ref versions.GetOrAdd(siteId, _ => new Versions()).Data);

    public void ModelChanged(string siteId) => Interlocked.Increment(ref versions.GetOrAdd(siteId, _ => new Versions()).Model);

    private sealed class Versions
    {
        public long Data;
        public long Model;
    }
}
