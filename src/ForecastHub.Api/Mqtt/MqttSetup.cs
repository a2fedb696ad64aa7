using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Mqtt;

public static class MqttSetup
{
    /// <summary>The MQTT subscription, validated at start; it does nothing while <c>Mqtt:Server</c> is empty.</summary>
    public static IServiceCollection AddForecastHubMqtt(this IServiceCollection services)
    {
        services.AddOptions<MqttOptions>().BindConfiguration(MqttOptions.SectionName).ValidateOnStart();
        services.AddSingleton<IValidateOptions<MqttOptions>>(new MqttOptionsValidator());
        services.AddSingleton<MqttSubscriptionState>();
        services.AddHostedService<MqttSubscription>();
        return services;
    }

    private sealed class MqttOptionsValidator : IValidateOptions<MqttOptions>
    {
        public ValidateOptionsResult Validate(string? name, MqttOptions options) =>
            options.Validate() is { } error ? ValidateOptionsResult.Fail(error) : ValidateOptionsResult.Success;
    }
}
