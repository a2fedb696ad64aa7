namespace ForecastHub.Api.Forecasts;

public static class ForecastsSetup
{
    /// <summary>Forecast answers, cached per site and query.</summary>
    public static IServiceCollection AddForecasts(this IServiceCollection services) =>
        services.AddSingleton<ForecastService>();
}
