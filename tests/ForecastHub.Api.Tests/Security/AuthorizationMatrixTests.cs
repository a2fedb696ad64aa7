using System.Net;
using System.Net.Http.Headers;
using System.Text;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Keys;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Security;

/// <summary>
/// Every endpoint of the running app, called by every kind of caller, must answer as its declared
/// access level says. An endpoint without a line in <see cref="Expectations"/> fails the test: add
/// yours there when you map a new endpoint.
/// </summary>
public sealed class AuthorizationMatrixTests
{
    public enum Access
    {
        /// <summary>Anyone, with or without a key (health probes, the dashboard page).</summary>
        Public,

        /// <summary>A read or admin key (no key at all when anonymous reads are on).</summary>
        Read,

        /// <summary>An admin key, or an ingest key for all sites or for the route's site.</summary>
        Ingest,

        /// <summary>An admin key only.</summary>
        Admin,
    }

    public enum Caller
    {
        NoKey,
        MalformedHeader,
        UnknownKey,
        ReadKey,
        IngestKeyForThisSite,
        IngestKeyForAnotherSite,
        AdminKey,
        ConfiguredAdminKey,
        RevokedAdminKey,
    }

    private const string ThisSite = "matrix-site";
    private const string OtherSite = "other-site";

    /// <summary>"METHOD route pattern" of every endpoint, and who may call it.</summary>
    public static readonly IReadOnlyDictionary<string, Access> Expectations = new Dictionary<string, Access>
    {
        ["GET /"] = Access.Public,
        ["GET /dashboard/{file}"] = Access.Public,
        ["GET /health/live"] = Access.Public,
        ["GET /health/ready"] = Access.Public,
        ["POST /api/v1/sites"] = Access.Admin,
        ["GET /api/v1/sites"] = Access.Read,
        ["GET /api/v1/sites/{siteId}"] = Access.Read,
        ["PATCH /api/v1/sites/{siteId}"] = Access.Admin,
        ["DELETE /api/v1/sites/{siteId}"] = Access.Admin,
        ["POST /api/v1/sites/{siteId}/observations"] = Access.Ingest,
        ["GET /api/v1/sites/{siteId}/observations"] = Access.Read,
        ["POST /api/v1/keys"] = Access.Admin,
        ["GET /api/v1/keys"] = Access.Admin,
        ["GET /api/v1/keys/{keyId}"] = Access.Admin,
        ["DELETE /api/v1/keys/{keyId}"] = Access.Admin,
        ["GET /api/v1/sites/{siteId}/model"] = Access.Read,
        ["POST /api/v1/sites/{siteId}/model/refit"] = Access.Admin,
        ["GET /api/v1/sites/{siteId}/forecast"] = Access.Read,
        ["GET /api/v1/sites/{siteId}/forecast.svg"] = Access.Read,
        ["GET /api/v1/sites/{siteId}/verification"] = Access.Read,
        ["GET /api/v1/sites/{siteId}/health"] = Access.Read,
        ["GET /api/v1/health/models"] = Access.Read,
        ["GET /metrics"] = Access.Read,
        ["POST /api/v1/webhooks"] = Access.Admin,
        ["GET /api/v1/webhooks"] = Access.Admin,
        ["GET /api/v1/webhooks/{webhookId}"] = Access.Admin,
        ["DELETE /api/v1/webhooks/{webhookId}"] = Access.Admin,
        ["GET /api/v1/webhooks/{webhookId}/deliveries"] = Access.Admin,
        ["GET /api/v1/alerts"] = Access.Read,
    };

    [Fact]
    public async Task EveryEndpointAnswersEveryCallerAsItsAccessLevelSays()
    {
        var failures = await RunMatrix(anonymousReads: false);

        Assert.True(failures.Count == 0, string.Join(Environment.NewLine, failures));
    }

    [Fact]
    public async Task WithAnonymousReadsOnlyReadEndpointsOpenUp()
    {
        var failures = await RunMatrix(anonymousReads: true);

        Assert.True(failures.Count == 0, string.Join(Environment.NewLine, failures));
    }

    [Fact]
    public async Task EveryMappedEndpointHasADeclaredExpectation()
    {
        await using var factory = NewFactory(anonymousReads: false);

        var mapped = MappedEndpoints(factory).Select(e => e.Name).ToList();

        var undeclared = mapped.Except(Expectations.Keys).ToList();
        var stale = Expectations.Keys.Except(mapped).ToList();
        Assert.True(undeclared.Count == 0,
            $"These endpoints have no expected access: add each to {nameof(AuthorizationMatrixTests)}.{nameof(Expectations)} " +
            $"as Public, Read, Ingest or Admin: {string.Join(", ", undeclared)}");
        Assert.True(stale.Count == 0, $"These expectations name endpoints that no longer exist: {string.Join(", ", stale)}");
    }

    private static async Task<List<string>> RunMatrix(bool anonymousReads)
    {
        await using var factory = NewFactory(anonymousReads);
        using var admin = factory.CreateAdminClient();
        using var client = factory.CreateClient();
        var keys = new Dictionary<Caller, string?>
        {
            [Caller.NoKey] = null,
            [Caller.UnknownKey] = "fhk_" + Convert.ToBase64String(new byte[32]).TrimEnd('=').Replace('+', '-').Replace('/', '_'),
            [Caller.ReadKey] = (await admin.IssueKey("read")).Secret,
            [Caller.IngestKeyForThisSite] = (await admin.IssueKey("ingest", ThisSite)).Secret,
            [Caller.IngestKeyForAnotherSite] = (await admin.IssueKey("ingest", OtherSite)).Secret,
            [Caller.AdminKey] = (await admin.IssueKey("admin")).Secret,
            [Caller.ConfiguredAdminKey] = ApiFactory.AdminKey,
        };
        var revoked = await admin.IssueKey("admin");
        await admin.Revoke(revoked.Id);
        keys[Caller.RevokedAdminKey] = revoked.Secret;

        var failures = new List<string>();
        foreach (var endpoint in MappedEndpoints(factory))
        {
            if (!Expectations.TryGetValue(endpoint.Name, out var access))
            {
                failures.Add($"{endpoint.Name}: no declared expectation");
                continue;
            }
            foreach (var caller in Enum.GetValues<Caller>())
            {
                await admin.CreateSite(Some.Site(ThisSite));
                var path = await FillRoute(endpoint.Pattern, admin);
                using var request = new HttpRequestMessage(new HttpMethod(endpoint.Method), new Uri(path, UriKind.Relative));
                if (endpoint.Method is "POST" or "PATCH" or "PUT")
                {
                    request.Content = new StringContent("{}", Encoding.UTF8, "application/json");
                }
                if (caller == Caller.MalformedHeader)
                {
                    request.Headers.Authorization = new AuthenticationHeaderValue("Basic", "c2l0ZTpwYXNzd29yZA==");
                }
                using var response = await client.SendAsync(request.With(keys.GetValueOrDefault(caller)));
                var expected = Expected(access, caller, anonymousReads);
                if (!Matches(expected, response.StatusCode))
                {
                    failures.Add($"{endpoint.Name} as {caller}: expected {expected}, got {(int)response.StatusCode} {response.StatusCode}");
                }
            }
        }
        return failures;
    }

    private enum Outcome
    {
        /// <summary>Past authorization: any answer but 401, 403, 429 or a 5xx.</summary>
        Allowed,
        Unauthorized,
        Forbidden,
    }

    private static Outcome Expected(Access access, Caller caller, bool anonymousReads)
    {
        if (access == Access.Public || (access == Access.Read && anonymousReads))
        {
            return Outcome.Allowed;
        }
        if (caller is Caller.NoKey or Caller.MalformedHeader or Caller.UnknownKey or Caller.RevokedAdminKey)
        {
            return Outcome.Unauthorized;
        }
        var allowed = caller switch
        {
            Caller.AdminKey or Caller.ConfiguredAdminKey => true,
            Caller.ReadKey => access == Access.Read,
            Caller.IngestKeyForThisSite => access == Access.Ingest,
            _ => false,
        };
        return allowed ? Outcome.Allowed : Outcome.Forbidden;
    }

    private static bool Matches(Outcome expected, HttpStatusCode status) => expected switch
    {
        Outcome.Unauthorized => status == HttpStatusCode.Unauthorized,
        Outcome.Forbidden => status == HttpStatusCode.Forbidden,
        _ => status is not (HttpStatusCode.Unauthorized or HttpStatusCode.Forbidden or HttpStatusCode.TooManyRequests) && (int)status < 500,
    };

    /// <summary>Route values the matrix can fill; a new parameter needs a sample here.</summary>
    private static async Task<string> FillRoute(string pattern, HttpClient admin)
    {
        var path = pattern.Replace("{siteId}", ThisSite, StringComparison.Ordinal)
            .Replace("{file}", "app.js", StringComparison.Ordinal)
            .Replace("{webhookId}", "wh-0123456789abcdef", StringComparison.Ordinal);
        if (path.Contains("{keyId}", StringComparison.Ordinal))
        {
            // A fresh key each time, so revoking it spends none of the matrix's own keys.
            path = path.Replace("{keyId}", (await admin.IssueKey("read")).Id, StringComparison.Ordinal);
        }
        Assert.False(path.Contains('{', StringComparison.Ordinal), $"{pattern}: add a sample value for its route parameter in {nameof(FillRoute)}");
        return path;
    }

    private static ApiFactory NewFactory(bool anonymousReads) => new()
    {
        AllowAnonymousRead = anonymousReads,
        Settings = new Dictionary<string, string?>
        {
            ["RateLimiting:PermitsPerWindow"] = "100000",
            ["RateLimiting:AnonymousPermitsPerWindow"] = "100000",
        },
    };

    private sealed record MappedEndpoint(string Method, string Pattern)
    {
        public string Name => $"{Method} {Pattern}";
    }

    private static List<MappedEndpoint> MappedEndpoints(ApiFactory factory)
    {
        _ = factory.Server;
        return factory.Services.GetRequiredService<EndpointDataSource>().Endpoints
            .OfType<RouteEndpoint>()
            .SelectMany(e => (e.Metadata.GetMetadata<HttpMethodMetadata>()?.HttpMethods ?? ["ANY"])
                .Select(m => new MappedEndpoint(m, "/" + (e.RoutePattern.RawText ?? "").Trim('/'))))
            .Distinct()
            .OrderBy(e => e.Pattern, StringComparer.Ordinal).ThenBy(e => e.Method, StringComparer.Ordinal)
            .ToList();
    }
}
