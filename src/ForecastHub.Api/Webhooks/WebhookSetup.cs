using ForecastHub.Api.Hosting;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Webhooks;

public static class WebhookSetup
{
    /// <summary>Webhook subscriptions, the persisted outbox and the delivery worker.</summary>
    public static IServiceCollection AddWebhooks(this IServiceCollection services)
    {
        services.AddOptions<WebhookOptions>().BindConfiguration(WebhookOptions.SectionName).ValidateOnStart();
        services.AddSingleton<IValidateOptions<WebhookOptions>>(new ThrowingValidator<WebhookOptions>(o => o.Validate()));
        services.AddSingleton<WebhookSender>();
        services.AddSingleton<WebhookDeliveryWorker>();
        services.AddHostedService(sp => sp.GetRequiredService<WebhookDeliveryWorker>());
        return services;
    }
}
