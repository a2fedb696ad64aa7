using System.Security.Claims;
using System.Text.Encodings.Web;
using Microsoft.AspNetCore.Authentication;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Auth;

/// <summary>Reads <c>Authorization: Bearer &lt;key&gt;</c>, asks <see cref="IApiKeyVerifier"/> who it
/// belongs to, and answers challenges and refusals as problem+json.</summary>
public sealed class ApiKeyAuthenticationHandler(
    IOptionsMonitor<AuthenticationSchemeOptions> options,
    ILoggerFactory logger,
    UrlEncoder encoder,
    IApiKeyVerifier verifier,
    IProblemDetailsService problems)
    : AuthenticationHandler<AuthenticationSchemeOptions>(options, logger, encoder)
{
    public const string SchemeName = "ApiKey";

    protected override async Task<AuthenticateResult> HandleAuthenticateAsync()
    {
        string? header = Request.Headers.Authorization;
        if (string.IsNullOrEmpty(header))
        {
            return AuthenticateResult.NoResult();
        }
        const string prefix = "Bearer ";
        if (!header.StartsWith(prefix, StringComparison.OrdinalIgnoreCase))
        {
            return AuthenticateResult.Fail("The Authorization header is not a Bearer key.");
        }
        var identity = await verifier.VerifyAsync(header[prefix.Length..].Trim(), Context.RequestAborted).ConfigureAwait(false);
        if (identity is null)
        {
            return AuthenticateResult.Fail("The key is not valid.");
        }
        var claims = new List<Claim>
        {
            new(ClaimTypes.NameIdentifier, identity.KeyId),
            new(ApiKeyScopes.KeyIdClaim, identity.KeyId),
            new(ApiKeyScopes.ScopeClaim, identity.Scope),
        };
        claims.AddRange(identity.SiteIds.Select(s => new Claim(ApiKeyScopes.SiteClaim, s)));
        var principal = new ClaimsPrincipal(new ClaimsIdentity(claims, SchemeName));
        return AuthenticateResult.Success(new AuthenticationTicket(principal, SchemeName));
    }

    protected override Task HandleChallengeAsync(AuthenticationProperties properties)
    {
        Response.StatusCode = StatusCodes.Status401Unauthorized;
        Response.Headers.WWWAuthenticate = "Bearer";
        return WriteProblem("Key required",
            "This call needs a key: send it as 'Authorization: Bearer <key>'. A key that was sent is missing, mistyped or revoked.");
    }

    protected override Task HandleForbiddenAsync(AuthenticationProperties properties)
    {
        Response.StatusCode = StatusCodes.Status403Forbidden;
        return WriteProblem("Not allowed", "The key is valid but its scope does not allow this call.");
    }

    private Task WriteProblem(string title, string detail) =>
        problems.WriteAsync(new ProblemDetailsContext
        {
            HttpContext = Context,
            ProblemDetails = { Status = Response.StatusCode, Title = title, Detail = detail },
        }).AsTask();
}
