using System.Collections.Concurrent;

namespace ForecastHub.Api.Models;

/// <summary>
/// In-memory versions per site that cached answers are keyed on: the data version goes up when
/// readings are stored, the model version when a model is saved, a fit fails or a day is scored.
/// A restart starts every version afresh, and the caches start empty with them. Versions only
/// ever grow, so an answer cached under old versions is never met again.
/// </summary>
public sealed class SiteVersions
{
    private readonly ConcurrentDictionary<string, Versions> versions = new(StringComparer.Ordinal);

    // Every site's versions start at this floor; moving it moves them all.
    private long floor;

    public (long Data, long Model) Get(string siteId)
    {
        if (versions.TryGetValue(siteId, out var v))
        {
            return (Interlocked.Read(ref v.Data), Interlocked.Read(ref v.Model));
        }

        var start = Interlocked.Read(ref floor);
        return (start, start);
    }

    public void DataChanged(string siteId) => Interlocked.Increment(ref Entry(siteId).Data);

    public void ModelChanged(string siteId) => Interlocked.Increment(ref Entry(siteId).Model);

    /// <summary>Moves every site's versions on: used when changes made elsewhere may have been missed.</summary>
    public void AllChanged()
    {
        Interlocked.Increment(ref floor);
        foreach (var (_, v) in versions)
        {
            Interlocked.Increment(ref v.Data);
            Interlocked.Increment(ref v.Model);
        }
    }

    private Versions Entry(string siteId) => versions.GetOrAdd(siteId, _ =>
    {
        var start = Interlocked.Read(ref floor);
        return new Versions { Data = start, Model = start };
    });

    private sealed class Versions
    {
        public long Data;
        public long Model;
    }
}
