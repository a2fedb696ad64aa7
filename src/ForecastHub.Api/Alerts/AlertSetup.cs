using ForecastHub.Api.Hosting;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Alerts;

public static class AlertSetup
{
    /// <summary>Alert evaluation after new data, after each refit and on a sweep, and the alert
    /// list. Call after <c>AddModels</c> and <c>AddWebhooks</c>: it wraps the reading, site and model stores.</summary>
    public static IServiceCollection AddAlerts(this IServiceCollection services)
    {
        services.AddOptions<AlertOptions>().BindConfiguration(AlertOptions.SectionName).ValidateOnStart();
        services.AddSingleton<Microsoft.Extensions.Options.IValidateOptions<AlertOptions>>(new ThrowingValidator<AlertOptions>(o => o.Validate()));
        services.AddSingleton<AlertQueue>();
        services.AddSingleton<ISiteRiskSource, ForecastRiskSource>();
        services.AddSingleton<AlertEvaluator>();
        services.AddSingleton<AlertWorker>();
        services.AddHostedService(sp => sp.GetRequiredService<AlertWorker>());
        services.Decorate<IReadingStore>((sp, inner) => new AlertingReadingStore(inner, sp.GetRequiredService<AlertQueue>()));
        services.Decorate<ISiteStore>((sp, inner) => new AlertingSiteStore(inner, sp.GetRequiredService<AlertQueue>()));
        services.Decorate<IModelStore>((sp, inner) => new AlertingModelStore(inner, sp.GetRequiredService<AlertQueue>()));
        return services;
    }
}
