using Microsoft.AspNetCore.Authorization;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Auth;

public static class AuthSetup
{
    /// <summary>The Bearer key scheme and the read, ingest and admin policies.</summary>
    public static IServiceCollection AddForecastHubAuth(this IServiceCollection services)
    {
        services.AddOptions<AuthOptions>().BindConfiguration(AuthOptions.SectionName);
        services.AddSingleton<IApiKeyVerifier, ConfiguredAdminKeyVerifier>();
        services.AddSingleton<IAuthorizationHandler, ReadAccessHandler>();
        services.AddAuthentication(ApiKeyAuthenticationHandler.SchemeName)
            .AddScheme<Microsoft.AspNetCore.Authentication.AuthenticationSchemeOptions, ApiKeyAuthenticationHandler>(
                ApiKeyAuthenticationHandler.SchemeName, null);
        services.AddAuthorizationBuilder()
            .AddPolicy(AuthPolicies.Read, policy => policy.AddRequirements(new ReadAccessRequirement()))
            .AddPolicy(AuthPolicies.Ingest, policy => policy.RequireClaim(ApiKeyScopes.ScopeClaim, ApiKeyScopes.Admin))
            .AddPolicy(AuthPolicies.Admin, policy => policy.RequireClaim(ApiKeyScopes.ScopeClaim, ApiKeyScopes.Admin));
        return services;
    }
}

public sealed class ReadAccessRequirement : IAuthorizationRequirement;

/// <summary>Reads are open when anonymous reads are switched on, and otherwise need any valid key.</summary>
internal sealed class ReadAccessHandler(IOptionsMonitor<AuthOptions> options) : AuthorizationHandler<ReadAccessRequirement>
{
    protected override Task HandleRequirementAsync(AuthorizationHandlerContext context, ReadAccessRequirement requirement)
    {
        if (options.CurrentValue.AllowAnonymousRead || context.User.Identity?.IsAuthenticated == true)
        {
            context.Succeed(requirement);
        }
        return Task.CompletedTask;
    }
}
