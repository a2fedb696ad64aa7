using Microsoft.AspNetCore.Authorization;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Auth;

public sealed class ReadAccessRequirement : IAuthorizationRequirement;

public sealed class IngestAccessRequirement : IAuthorizationRequirement;

/// <summary>Reads are open when <c>Auth:AllowAnonymousRead</c> is on; otherwise they need a read or
/// admin key. Ingest keys cannot read: a logger's key, if stolen, exposes no data.</summary>
internal sealed class ReadAccessHandler(IOptionsMonitor<AuthOptions> options) : AuthorizationHandler<ReadAccessRequirement>
{
    protected override Task HandleRequirementAsync(AuthorizationHandlerContext context, ReadAccessRequirement requirement)
    {
        if (options.CurrentValue.AllowAnonymousRead
            || context.User.HasClaim(ApiKeyScopes.ScopeClaim, ApiKeyScopes.Read)
            || context.User.HasClaim(ApiKeyScopes.ScopeClaim, ApiKeyScopes.Admin))
        {
            context.Succeed(requirement);
        }
        return Task.CompletedTask;
    }
}

/// <summary>Writing a site's data: an admin key, or an ingest key for all sites or for the site
/// named by the route's <c>siteId</c>.</summary>
internal sealed class IngestAccessHandler : AuthorizationHandler<IngestAccessRequirement>
{
    public const string SiteRouteValue = "siteId";

    protected override Task HandleRequirementAsync(AuthorizationHandlerContext context, IngestAccessRequirement requirement)
    {
        var user = context.User;
        if (user.HasClaim(ApiKeyScopes.ScopeClaim, ApiKeyScopes.Admin))
        {
            context.Succeed(requirement);
        }
        else if (user.HasClaim(ApiKeyScopes.ScopeClaim, ApiKeyScopes.Ingest))
        {
            var sites = user.FindAll(ApiKeyScopes.SiteClaim).Select(c => c.Value).ToList();
            var siteId = (context.Resource as HttpContext)?.GetRouteValue(SiteRouteValue) as string;
            if (sites.Count == 0 || (siteId is not null && sites.Contains(siteId, StringComparer.Ordinal)))
            {
                context.Succeed(requirement);
            }
        }
        return Task.CompletedTask;
    }
}
