namespace ForecastHub.Api.Health;

public static class ModelHealthSetup
{
    /// <summary>Model health per site and for the fleet (thresholds: <c>Health</c> options, bound by <c>AddModels</c>).</summary>
    public static IServiceCollection AddModelHealth(this IServiceCollection services)
    {
        services.AddSingleton<ModelHealthService>();
        services.AddSingleton<FleetHealth>();
        return services;
    }
}
