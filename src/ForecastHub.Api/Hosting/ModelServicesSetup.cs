using ForecastHub.Api.Cluster;
using ForecastHub.Api.Forecasts;
using ForecastHub.Api.Health;
using ForecastHub.Api.Metrics;
using ForecastHub.Api.Models;
using ForecastHub.Api.Sites;
using ForecastHub.Api.Verification;
using ForecastHub.Core.Health;
using ForecastHub.Storage;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Verification;
using Microsoft.Extensions.DependencyInjection.Extensions;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Hosting;

public static class ModelServicesSetup
{
    /// <summary>
    /// Models, background refits, forecasts, verification, model health and metrics. Call after
    /// <c>AddForecastHubStorage</c>: the reading and site stores are wrapped so that new data and
    /// settings changes reach the refit queue and the caches; site records are kept in memory.
    /// </summary>
    public static IServiceCollection AddForecastHubModels(this IServiceCollection services)
    {
        services.TryAddSingleton(TimeProvider.System);
        services.AddOptions<HealthOptions>().BindConfiguration("Health").ValidateOnStart();
        services.AddSingleton<IValidateOptions<HealthOptions>>(new ThrowingValidator<HealthOptions>(o => o.Validate()));
        services.AddOptions<RefitOptions>().BindConfiguration(RefitOptions.SectionName).ValidateOnStart();
        services.AddSingleton<IValidateOptions<RefitOptions>>(new ThrowingValidator<RefitOptions>(o => o.Validate()));
        services.AddOptions<LiveScoreOptions>().BindConfiguration(LiveScoreOptions.SectionName)
            .Validate(o => o.WindowDays is >= 1 and <= 365 && o.MinObservedShare is > 0 and <= 1, "LiveScores:WindowDays must be 1-365 and LiveScores:MinObservedShare in (0, 1].")
            .ValidateOnStart();

        services.AddOptions<ClusterOptions>().BindConfiguration(ClusterOptions.SectionName).ValidateOnStart();
        services.AddSingleton<IValidateOptions<ClusterOptions>>(new ThrowingValidator<ClusterOptions>(o => o.Validate()));
        services.AddSingleton<WorkLeaseRunner>();
        services.AddSingleton<NodeCaches>();
        services.AddHostedService<ChangeListener>();

        services.AddForecastHubMetrics();
        services.AddSingleton<SiteVersions>();
        services.AddSingleton<RefitQueue>();
        services.AddSingleton<SiteModeling>();
        Wrap<IReadingStore>(services, (sp, inner) => new NotifyingReadingStore(inner,
            sp.GetRequiredService<SiteVersions>(), sp.GetRequiredService<RefitQueue>(), sp.GetRequiredService<ServiceMetrics>()));
        Wrap<ISiteStore>(services, (sp, inner) => sp.GetRequiredService<NodeCaches>().Sites = new CachedSiteStore(inner));
        Wrap<ISiteStore>(services, (sp, inner) => new NotifyingSiteStore(inner,
            sp.GetRequiredService<SiteVersions>(), sp.GetRequiredService<RefitQueue>(), sp.GetRequiredService<ModelService>()));

        // The grid loader and model service read the undecorated stores' data through the decorated ones; reads pass straight through.
        services.AddSingleton(sp => new SiteGridLoader(sp.GetRequiredService<IReadingStore>()));
        services.AddSingleton<ModelService>();
        services.AddSingleton<ModelHealthService>();
        services.AddSingleton<FleetHealth>();
        services.AddSingleton<ForecastService>();
        services.AddSingleton<SiteRiskService>();
        services.AddSingleton<VerificationService>();
        services.AddSingleton<ISweepStep, DayAheadArchiveStep>();
        services.AddSingleton<RefitWorker>();
        services.AddHostedService(sp => sp.GetRequiredService<RefitWorker>());
        return services;
    }

    /// <summary>The routes of this part of the service under <c>/api/v1</c>, and <c>/metrics</c>.</summary>
    public static WebApplication MapForecastHubModels(this WebApplication app, RouteGroupBuilder api)
    {
        ArgumentNullException.ThrowIfNull(app);
        api.MapModels();
        api.MapForecasts();
        api.MapVerification();
        api.MapModelHealth();
        app.MapMetrics();
        return app;
    }

    // Replaces the registration of T with a decorator around the instance it made.
    internal static void Wrap<T>(IServiceCollection services, Func<IServiceProvider, T, T> decorate)
        where T : class
    {
        var original = services.Last(d => d.ServiceType == typeof(T));
        services.Remove(original);
        services.AddSingleton(sp => decorate(sp, (T)Create(sp, original)));
    }

    private static object Create(IServiceProvider sp, ServiceDescriptor descriptor) =>
        descriptor.ImplementationInstance
        ?? descriptor.ImplementationFactory?.Invoke(sp)
        ?? ActivatorUtilities.CreateInstance(sp, descriptor.ImplementationType!);
}

/// <summary>Turns an options record's own Validate (which throws naming the setting) into an options validation result.</summary>
internal sealed class ThrowingValidator<T>(Action<T> validate) : IValidateOptions<T>
    where T : class
{
    public ValidateOptionsResult Validate(string? name, T options)
    {
        try
        {
            validate(options);
            return ValidateOptionsResult.Success;
        }
        catch (ArgumentException error)
        {
            return ValidateOptionsResult.Fail(error.Message);
        }
    }
}
