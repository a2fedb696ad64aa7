using ForecastHub.Api.Auth;
using ForecastHub.Api.Models;
using ForecastHub.Api.Sites;
using ForecastHub.Storage.Postgres.Cluster;

namespace ForecastHub.Api.Cluster;

/// <summary>
/// Everything this node keeps in memory about stored facts, and how a change made by any node
/// (heard as a <see cref="ChangeNotice"/>) reaches it: the site records, the parsed models, the
/// versions cached forecasts are keyed on, and verified API keys.
/// </summary>
public sealed class NodeCaches(SiteVersions versions, ModelService models, ApiKeyCache keys, WindowRowCache fitWindows)
{
    /// <summary>Set when the site store is decorated with its cache.</summary>
    public CachedSiteStore? Sites { get; set; }

    public void Apply(ChangeNotice notice)
    {
        switch (notice.Kind)
        {
            case ChangeKind.Site:
                Sites?.Forget(notice.Id);
                models.Forget(notice.Id);
                fitWindows.Forget(notice.Id);
                versions.DataChanged(notice.Id);
                versions.ModelChanged(notice.Id);
                break;
            case ChangeKind.Data:
                fitWindows.Forget(notice.Id);
                versions.DataChanged(notice.Id);
                break;
            case ChangeKind.Model:
                models.Forget(notice.Id);
                versions.ModelChanged(notice.Id);
                break;
            case ChangeKind.Key:
                keys.Evict(notice.Id);
                break;
        }
    }

    /// <summary>Drops everything: changes may have been missed (the listener was not connected).</summary>
    public void ForgetAll()
    {
        Sites?.Forget(null);
        models.Forget(null);
        fitWindows.Forget(null);
        versions.AllChanged();
        keys.Clear();
    }
}
