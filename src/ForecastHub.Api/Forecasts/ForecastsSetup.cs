namespace ForecastHub.Api.Forecasts;

public static class ForecastsSetup
{
    /// <summary>Forecast answers, cached per site and query, and the site risk that alerts evaluate.</summary>
    public static IServiceCollection AddForecasts(this IServiceCollection services) =>
        services.AddSingleton<ForecastService>()
            .AddSingleton<SiteRiskService>();
}
