using ForecastHub.Api.Hosting;
using ForecastHub.Api.Metrics;
using ForecastHub.Core.Health;
using ForecastHub.Storage;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Models;

public static class ModelsSetup
{
    /// <summary>
    /// Fitted models, the refit queue and its background worker. The reading and site stores are
    /// wrapped so that new data and settings changes reach the refit queue and the caches; call
    /// after <c>AddSites</c>, so the notification wraps the site cache.
    /// </summary>
    public static IServiceCollection AddModels(this IServiceCollection services)
    {
        services.AddOptions<HealthOptions>().BindConfiguration("Health").ValidateOnStart();
        services.AddSingleton<IValidateOptions<HealthOptions>>(new ThrowingValidator<HealthOptions>(o => o.Validate()));
        services.AddOptions<RefitOptions>().BindConfiguration(RefitOptions.SectionName).ValidateOnStart();
        services.AddSingleton<IValidateOptions<RefitOptions>>(new ThrowingValidator<RefitOptions>(o => o.Validate()));

        services.AddSingleton<SiteVersions>();
        services.AddSingleton<RefitQueue>();
        // Off on PostgreSQL: other nodes' writes are heard of only after they commit (WindowRowCache).
        services.AddSingleton(sp => new WindowRowCache(sp.GetRequiredService<IOptions<StorageOptions>>().Value.IsPostgres
            ? 0 : sp.GetRequiredService<IOptions<RefitOptions>>().Value.WindowCacheMegabytes * 1024L * 1024L));
        services.Decorate<IReadingStore>((sp, inner) => new NotifyingReadingStore(inner,
            sp.GetRequiredService<SiteVersions>(), sp.GetRequiredService<RefitQueue>(), sp.GetRequiredService<ServiceMetrics>(), sp.GetRequiredService<WindowRowCache>()));
        services.Decorate<ISiteStore>((sp, inner) => new NotifyingSiteStore(inner,
            sp.GetRequiredService<SiteVersions>(), sp.GetRequiredService<RefitQueue>(), sp.GetRequiredService<ModelService>(), sp.GetRequiredService<WindowRowCache>()));

        // The grid loader and model service read through the decorated stores; reads pass straight through.
        services.AddSingleton(sp => new SiteGridLoader(sp.GetRequiredService<IReadingStore>(), sp.GetRequiredService<IReadingSummaryStore>(),
            sp.GetRequiredService<WindowRowCache>()));
        services.AddSingleton<ModelService>();
        services.AddSingleton<RefitWorker>();
        services.AddHostedService(sp => sp.GetRequiredService<RefitWorker>());
        return services;
    }
}
