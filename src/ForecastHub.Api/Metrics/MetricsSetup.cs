using ForecastHub.Api.Health;

namespace ForecastHub.Api.Metrics;

public static class MetricsSetup
{
    /// <summary>The host's metrics registry and the service's named metrics; features add their own gauges.</summary>
    public static IServiceCollection AddServiceMetrics(this IServiceCollection services)
    {
        services.AddSingleton<MetricsRegistry>();
        services.AddSingleton(sp =>
        {
            var metrics = new ServiceMetrics(sp.GetRequiredService<MetricsRegistry>());
            metrics.AddSitesByStateGauge(() => sp.GetRequiredService<FleetHealth>().Latest?.Counts);
            return metrics;
        });
        return services;
    }
}
