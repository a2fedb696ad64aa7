using ForecastHub.Api.Http;
using System.Text.Json;
using System.Text.RegularExpressions;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Hosting;
using ForecastHub.Api.OpenApi;
using ForecastHub.Api.Problems;
using ForecastHub.Api.Sites;
using ForecastHub.Storage.Keys;
using ForecastHub.Storage.Sites;
using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.AspNetCore.Mvc;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Keys;

public static partial class KeysEndpoints
{
    public const int MaxBodyBytes = 4 * 1024;
    public const int MaxSiteIds = 100;
    public const int MaxLabelLength = 100;
    public const int DefaultPageSize = 100;
    public const int MaxPageSize = 1000;

    private static readonly string[] Scopes = [ApiKeyScopes.Admin, ApiKeyScopes.Ingest, ApiKeyScopes.Read];

    /// <summary>Key management; every call needs an admin key.</summary>
    public static RouteGroupBuilder MapKeys(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/keys").WithTags("Keys").RequireAuthorization(AuthPolicies.Admin);
        group.MapPost("/", Create).WithName("CreateKey")
            .WithSummary("Create an API key; the answer is the only time its secret is shown.")
            .Accepts<KeyBody>("application/json")
            .WithRequestBodyLimit(MaxBodyBytes)
            .ProducesProblem(StatusCodes.Status409Conflict);
        group.MapGet("/", List).WithName("ListKeys").WithSummary("List API keys by id, one page at a time, without their secrets.")
            .ProducesProblem(StatusCodes.Status400BadRequest).WithNextLinkHeader();
        group.MapGet("/{keyId}", Get).WithName("GetKey").WithSummary("Read one API key without its secret.");
        group.MapDelete("/{keyId}", Revoke).WithName("RevokeKey")
            .WithSummary("Revoke an API key; it stops working at once and stays listed with its revocation time.")
            .ProducesProblem(StatusCodes.Status409Conflict);
        return group;
    }

    /// <response code="409">The new key's random id met a key created at the same moment; nothing was stored: send the request again.</response>
    public static async Task<Results<Created<CreatedKeyResponse>, ValidationProblem, ProblemHttpResult>> Create(
        HttpRequest request, HttpResponse response, IApiKeyStore keys, ISiteStore sites, TimeProvider clock, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(response);
        var (body, problem) = await RequestBody.ReadObjectAsync<KeyBody>(request, MaxBodyBytes, "key request",
            "{\"scope\": \"read\"}", cancellationToken).ConfigureAwait(false);
        if (problem is not null)
        {
            return problem;
        }
        var errors = Validate(body!);
        if (errors.Count > 0)
        {
            return ApiProblems.Invalid(errors);
        }
        var siteIds = (body!.SiteIds ?? []).Distinct(StringComparer.Ordinal).Order(StringComparer.Ordinal).ToList();
        foreach (var siteId in siteIds)
        {
            if (await sites.GetAsync(siteId, cancellationToken).ConfigureAwait(false) is null)
            {
                return ApiProblems.Invalid(new Dictionary<string, string[]>
                {
                    ["siteIds"] = [$"There is no site '{siteId}'; create it first (POST /api/v1/sites), then its ingest key."],
                });
            }
        }
        var secret = ApiKeySecrets.NewSecret();
        var record = new ApiKeyRecord(ApiKeySecrets.NewId(), ApiKeySecrets.Digest(secret), body.Scope!, siteIds,
            string.IsNullOrWhiteSpace(body.Label) ? null : body.Label.Trim(), clock.GetUtcNow(), null);
        if (!await keys.CreateAsync(record, cancellationToken).ConfigureAwait(false))
        {
            return ApiProblems.Conflict("A key with the same id was created at the same moment; send the request again.");
        }
        // The secret must not linger in any cache between the service and the caller.
        response.Headers.CacheControl = "no-store";
        return TypedResults.Created($"/api/v1/keys/{record.Id}",
            new CreatedKeyResponse(record.Id, secret, record.Scope, record.SiteIds, record.Label, record.CreatedAt));
    }

    /// <param name="after">Where the page starts: the cursor from the previous page's <c>next</c> link; absent for the first page.</param>
    /// <param name="limit">Most items on this page.</param>
    public static async Task<Results<Ok<KeyList>, ProblemHttpResult>> List(
        IApiKeyStore keys, [FromQuery] string? after, [FromQuery, QueryValue(QueryValueKind.WholeNumber, Minimum = 1, Maximum = MaxPageSize, Default = DefaultPageSize)] string? limit, CancellationToken cancellationToken)
    {
        var pageSize = DefaultPageSize;
        if (limit is not null && (!int.TryParse(limit, out pageSize) || pageSize < 1 || pageSize > MaxPageSize))
        {
            return ApiProblems.BadRequest("limit", $"limit must be a whole number from 1 to {MaxPageSize}.");
        }
        var page = await keys.ListAsync(after, pageSize + 1, cancellationToken).ConfigureAwait(false);
        var shown = page.Take(pageSize).Select(KeyResponse.From).ToList();
        var next = page.Count > pageSize ? $"/api/v1/keys?after={Uri.EscapeDataString(shown[^1].Id)}&limit={pageSize}" : null;
        return TypedResults.Ok(new KeyList(shown, next));
    }

    public static async Task<Results<Ok<KeyResponse>, ProblemHttpResult>> Get(string keyId, IApiKeyStore keys, CancellationToken cancellationToken)
    {
        var key = await keys.GetAsync(keyId, cancellationToken).ConfigureAwait(false);
        return key is null ? NoSuchKey(keyId) : TypedResults.Ok(KeyResponse.From(key));
    }

    /// <response code="409">The key cannot be revoked: it is the configured admin key (Auth:AdminKey), it was already revoked (the detail says
    /// when), or it is the last active admin key while no Auth:AdminKey is configured (create another admin key first).</response>
    public static async Task<Results<NoContent, ProblemHttpResult>> Revoke(
        string keyId, HttpContext context, IApiKeyStore keys, ApiKeyCache cache, IOptions<AuthOptions> auth, TimeProvider clock,
        CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(context);
        ArgumentNullException.ThrowIfNull(cache);
        ArgumentNullException.ThrowIfNull(auth);
        if (keyId == StoredApiKeyVerifier.ConfiguredAdminKeyId)
        {
            return ApiProblems.Conflict("The configured admin key cannot be revoked here: remove or change Auth:AdminKey in the configuration and restart.");
        }
        if (!KeyIdPattern().IsMatch(keyId))
        {
            return NoSuchKey(keyId);
        }
        // Without a configured key, revoking the last active admin key (itself, or another in a race between nodes) would lock everyone out.
        var keepAnActiveAdmin = string.IsNullOrEmpty(auth.Value.AdminKey);
        var revocation = await keys.RevokeAsync(keyId, clock.GetUtcNow(), keepAnActiveAdmin, cancellationToken).ConfigureAwait(false);
        cache.Evict(keyId);
        return revocation?.Outcome switch
        {
            null => NoSuchKey(keyId),
            KeyRevocationOutcome.Revoked => TypedResults.NoContent(),
            KeyRevocationOutcome.LastActiveAdmin => ApiProblems.Conflict(context.User.HasClaim(ApiKeyScopes.KeyIdClaim, keyId)
                ? $"Key '{keyId}' is the last active admin key and cannot revoke itself; create another admin key first."
                : $"Key '{keyId}' is the last active admin key and cannot be revoked; create another admin key first."),
            _ => ApiProblems.Conflict(string.Create(System.Globalization.CultureInfo.InvariantCulture,
                $"Key '{keyId}' was already revoked at {revocation.Key.RevokedAt:yyyy-MM-dd'T'HH:mm:ss'Z'}.")),
        };
    }

    private static ProblemHttpResult NoSuchKey(string keyId) =>
        ApiProblems.NotFound(KeyIdPattern().IsMatch(keyId)
            ? $"There is no key '{keyId}'."
            : "There is no such key: key ids look like 'key-' followed by 16 hexadecimal digits.");

    [GeneratedRegex("^key-[0-9a-f]{16}$")]
    private static partial Regex KeyIdPattern();

    private static Dictionary<string, string[]> Validate(KeyBody body)
    {
        var errors = new Dictionary<string, string[]>();
        if (body.Scope is null || !Scopes.Contains(body.Scope, StringComparer.Ordinal))
        {
            errors["scope"] = [$"scope must be one of {string.Join(", ", Scopes)}."];
        }
        var siteIds = body.SiteIds ?? [];
        if (siteIds.Count > 0 && body.Scope != ApiKeyScopes.Ingest)
        {
            errors["siteIds"] = ["siteIds applies to ingest keys only; admin and read keys cover every site."];
        }
        else if (siteIds.Count > MaxSiteIds)
        {
            errors["siteIds"] = [$"An ingest key may list at most {MaxSiteIds} sites; leave siteIds out for all sites."];
        }
        else if (siteIds.Where(s => s is null || !SiteRules.IsValidSiteId(s)).Select(s => s ?? "null").FirstOrDefault() is { } bad)
        {
            errors["siteIds"] = [$"'{bad}' is not a site id: site ids are slugs of lower-case letters, digits and '-', at most 63 characters."];
        }
        if (body.Label is { Length: > MaxLabelLength })
        {
            errors["label"] = [$"label may be at most {MaxLabelLength} characters."];
        }
        return errors;
    }
}
