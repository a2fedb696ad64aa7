using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Hosting;

public static class ServiceDecoration
{
    /// <summary>Replaces the registration of <typeparamref name="T"/> with a decorator around the instance it made.</summary>
    public static IServiceCollection Decorate<T>(this IServiceCollection services, Func<IServiceProvider, T, T> decorate)
        where T : class
    {
        var original = services.Last(d => d.ServiceType == typeof(T));
        services.Remove(original);
        services.AddSingleton(sp => decorate(sp, (T)Create(sp, original)));
        return services;
    }

    private static object Create(IServiceProvider sp, ServiceDescriptor descriptor) =>
        descriptor.ImplementationInstance
        ?? descriptor.ImplementationFactory?.Invoke(sp)
        ?? ActivatorUtilities.CreateInstance(sp, descriptor.ImplementationType!);
}

/// <summary>Turns an options record's own Validate (which throws naming the setting) into an options validation result.</summary>
public sealed class ThrowingValidator<T>(Action<T> validate) : IValidateOptions<T>
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
