using ForecastHub.Storage.Keys;
using Microsoft.AspNetCore.Authentication;
using Microsoft.AspNetCore.Authorization;

namespace ForecastHub.Api.Auth;

public static class AuthSetup
{
    /// <summary>The Bearer key scheme over stored and configured keys, the read, ingest and admin
    /// policies, and the first-start admin key.</summary>
    public static IServiceCollection AddForecastHubAuth(this IServiceCollection services)
    {
        services.AddOptions<AuthOptions>()
            .BindConfiguration(AuthOptions.SectionName)
            .Validate(o => o.AdminKey.Length == 0 || o.AdminKey.Trim().Length >= AuthOptions.MinAdminKeyLength,
                $"Auth:AdminKey must be empty (a key is generated) or at least {AuthOptions.MinAdminKeyLength} characters, e.g. from 'openssl rand -hex 32'.")
            .Validate(o => o.AdminKey.Length <= ApiKeySecrets.MaxPresentedLength, $"Auth:AdminKey may be at most {ApiKeySecrets.MaxPresentedLength} characters.")
            .Validate(o => o.KeyCacheSeconds is >= 0 and <= 3600, "Auth:KeyCacheSeconds must be from 0 to 3600.")
            .ValidateOnStart();
        services.AddSingleton<ApiKeyCache>();
        services.AddSingleton<IApiKeyVerifier, StoredApiKeyVerifier>();
        services.AddSingleton(new FirstAdminKeyOutput(Console.Out));
        services.AddHostedService<FirstAdminKey>();
        services.AddSingleton<IAuthorizationHandler, ReadAccessHandler>();
        services.AddSingleton<IAuthorizationHandler, IngestAccessHandler>();
        services.AddAuthentication(ApiKeyAuthenticationHandler.SchemeName)
            .AddScheme<AuthenticationSchemeOptions, ApiKeyAuthenticationHandler>(ApiKeyAuthenticationHandler.SchemeName, null);
        services.AddAuthorizationBuilder()
            .AddPolicy(AuthPolicies.Read, policy => policy.AddRequirements(new ReadAccessRequirement()))
            .AddPolicy(AuthPolicies.Ingest, policy => policy.RequireAuthenticatedUser().AddRequirements(new IngestAccessRequirement()))
            .AddPolicy(AuthPolicies.Admin, policy => policy.RequireClaim(ApiKeyScopes.ScopeClaim, ApiKeyScopes.Admin));
        return services;
    }
}
