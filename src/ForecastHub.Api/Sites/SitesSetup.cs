using ForecastHub.Api.Cluster;
using ForecastHub.Api.Hosting;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Sites;

public static class SitesSetup
{
    /// <summary>Site records kept in memory (<see cref="CachedSiteStore"/>) around the storage's site store; other nodes' changes drop them (<see cref="NodeCaches"/>).</summary>
    public static IServiceCollection AddSites(this IServiceCollection services) =>
        services.Decorate<ISiteStore>((sp, inner) => sp.GetRequiredService<NodeCaches>().Sites = new CachedSiteStore(inner));
}
