using ForecastHub.Api.Hosting;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Sites;

public static class SitesSetup
{
    /// <summary>Site records kept in memory (<see cref="CachedSiteStore"/>) around the storage's site store.</summary>
    public static IServiceCollection AddSites(this IServiceCollection services) =>
        services.Decorate<ISiteStore>((_, inner) => new CachedSiteStore(inner));
}
