using System.Net;
using System.Net.Http.Headers;
using System.Net.Http.Json;
using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Keys;
using ForecastHub.Api.Tests.Models;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.TestHost;

namespace ForecastHub.Api.Tests.Http;

public sealed class HttpConventionTests
{
    [Theory]
    [InlineData("/api/v1/sites/tagged/forecast")]
    [InlineData("/api/v1/sites/tagged/forecast.svg")]
    [InlineData("/api/v1/sites/tagged/model")]
    [InlineData("/api/v1/sites/tagged/verification")]
    public async Task SiteAnswersCarryAnETagThatRevalidatesTo304UntilNewDataArrives(string path)
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("tagged");
        await factory.IngestAsync("tagged", ModelScenario.History(factory, days: 8));
        await client.RefitAsync("tagged");

        using var first = await client.GetAsync(new Uri(path, UriKind.Relative));
        var tag = first.Headers.ETag;
        using var again = await GetIfNoneMatchAsync(client, path, tag!);
        await factory.IngestAsync("tagged", [(factory.Clock.GetUtcNow().AddMinutes(-10), 11.5)]);
        using var afterNewData = await GetIfNoneMatchAsync(client, path, tag!);

        Assert.Equal(HttpStatusCode.OK, first.StatusCode);
        Assert.NotNull(tag);
        Assert.False(tag.IsWeak);
        Assert.True(first.Headers.CacheControl is { Private: true, NoCache: true, MaxAge: null }, $"Cache-Control: {first.Headers.CacheControl}");
        Assert.Equal(HttpStatusCode.NotModified, again.StatusCode);
        Assert.Equal(tag, again.Headers.ETag);
        Assert.Empty(await again.Content.ReadAsByteArrayAsync());
        Assert.Equal(HttpStatusCode.OK, afterNewData.StatusCode);
        Assert.NotEqual(tag, afterNewData.Headers.ETag);
    }

    [Fact]
    public async Task ETagDiffersByQueryAndProblemsCarryNone()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("tagged");

        using var unfitted = await client.GetAsync(new Uri("/api/v1/sites/tagged/forecast", UriKind.Relative));
        await factory.IngestAsync("tagged", ModelScenario.History(factory, days: 8));
        await client.RefitAsync("tagged");
        using var short12 = await client.GetAsync(new Uri("/api/v1/sites/tagged/forecast?steps=12", UriKind.Relative));
        using var short24 = await client.GetAsync(new Uri("/api/v1/sites/tagged/forecast?steps=24", UriKind.Relative));

        Assert.Equal(HttpStatusCode.Conflict, unfitted.StatusCode);
        Assert.Null(unfitted.Headers.ETag);
        Assert.NotEqual(short12.Headers.ETag, short24.Headers.ETag);
    }

    [Fact]
    public async Task ConfiguredOriginGetsPreflightAndCorsHeadersOthersDoNot()
    {
        await using var factory = new ApiFactory
        {
            AllowAnonymousRead = true,
            Settings = new Dictionary<string, string?> { ["Cors:Origins:0"] = "https://dash.example.org" },
        };
        using var client = factory.CreateClient();

        using var preflight = new HttpRequestMessage(HttpMethod.Options, "/api/v1/sites");
        preflight.Headers.Add("Origin", "https://dash.example.org");
        preflight.Headers.Add("Access-Control-Request-Method", "GET");
        preflight.Headers.Add("Access-Control-Request-Headers", "authorization");
        using var preflightAnswer = await client.SendAsync(preflight);
        using var allowed = await GetWithOriginAsync(client, "https://dash.example.org");
        using var other = await GetWithOriginAsync(client, "https://elsewhere.example.org");

        Assert.Equal(HttpStatusCode.NoContent, preflightAnswer.StatusCode);
        Assert.Equal("https://dash.example.org", preflightAnswer.Headers.GetValues("Access-Control-Allow-Origin").Single());
        Assert.Contains("GET", preflightAnswer.Headers.GetValues("Access-Control-Allow-Methods").Single(), StringComparison.Ordinal);
        Assert.Contains("authorization", preflightAnswer.Headers.GetValues("Access-Control-Allow-Headers").Single(), StringComparison.OrdinalIgnoreCase);
        Assert.Equal("https://dash.example.org", allowed.Headers.GetValues("Access-Control-Allow-Origin").Single());
        Assert.Contains("ETag", allowed.Headers.GetValues("Access-Control-Expose-Headers").Single(), StringComparison.Ordinal);
        Assert.False(other.Headers.Contains("Access-Control-Allow-Origin"));
    }

    [Fact]
    public async Task WithoutConfiguredOriginsThereIsNoCors()
    {
        await using var factory = new ApiFactory { AllowAnonymousRead = true };
        using var client = factory.CreateClient();

        using var answer = await GetWithOriginAsync(client, "https://dash.example.org");

        Assert.Equal(HttpStatusCode.OK, answer.StatusCode);
        Assert.False(answer.Headers.Contains("Access-Control-Allow-Origin"));
    }

    [Fact]
    public async Task AnonymousLimitPartitionsByTheClientThatAKnownProxyNames()
    {
        await using var factory = new ApiFactory
        {
            AllowAnonymousRead = true,
            Settings = new Dictionary<string, string?>
            {
                ["RateLimiting:AnonymousPermitsPerWindow"] = "1",
                ["ForwardedHeaders:KnownProxies:0"] = "10.0.0.5",
            },
        };
        _ = factory.CreateClient();

        var first = await SendViaAsync(factory.Server, proxy: "10.0.0.5", client: "203.0.113.1");
        var otherClient = await SendViaAsync(factory.Server, proxy: "10.0.0.5", client: "203.0.113.2");
        var firstAgain = await SendViaAsync(factory.Server, proxy: "10.0.0.5", client: "203.0.113.1");

        Assert.Equal(StatusCodes.Status200OK, first.Response.StatusCode);
        Assert.Equal(StatusCodes.Status200OK, otherClient.Response.StatusCode);
        Assert.Equal(StatusCodes.Status429TooManyRequests, firstAgain.Response.StatusCode);
        Assert.Equal("203.0.113.1", first.Connection.RemoteIpAddress?.ToString());
    }

    [Fact]
    public async Task ForwardedHeadersFromAnUnknownAddressAreIgnored()
    {
        await using var factory = new ApiFactory
        {
            AllowAnonymousRead = true,
            Settings = new Dictionary<string, string?>
            {
                ["RateLimiting:AnonymousPermitsPerWindow"] = "1",
                ["ForwardedHeaders:KnownNetworks:0"] = "10.1.0.0/16",
            },
        };
        _ = factory.CreateClient();

        var first = await SendViaAsync(factory.Server, proxy: "10.9.0.7", client: "203.0.113.1");
        var spoofed = await SendViaAsync(factory.Server, proxy: "10.9.0.7", client: "203.0.113.2");
        var fromKnownNetwork = await SendViaAsync(factory.Server, proxy: "10.1.4.4", client: "203.0.113.3");

        Assert.Equal(StatusCodes.Status200OK, first.Response.StatusCode);
        Assert.Equal("10.9.0.7", first.Connection.RemoteIpAddress?.ToString());
        Assert.Equal(StatusCodes.Status429TooManyRequests, spoofed.Response.StatusCode);
        Assert.Equal("203.0.113.3", fromKnownNetwork.Connection.RemoteIpAddress?.ToString());
    }

    [Fact]
    public async Task SiteAndKeyListsAnswerALinkToTheNextPage()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("first");
        await client.CreateHourlySiteAsync("second");
        await client.IssueKey("read");
        await client.IssueKey("read");

        foreach (var path in new[] { "/api/v1/sites?limit=1", "/api/v1/keys?limit=1" })
        {
            using var page = await client.GetAsync(new Uri(path, UriKind.Relative));
            var next = (await page.Content.ReadFromJsonAsync<JsonElement>()).GetProperty("next").GetString();

            Assert.NotNull(next);
            Assert.Equal($"<{next}>; rel=\"next\"", page.Headers.GetValues("Link").Single());
            using var last = await client.GetAsync(new Uri(next, UriKind.Relative));
            Assert.False(last.Headers.Contains("Link"), $"{path}: the last page names no next page");
        }
    }

    [Theory]
    [InlineData(null, "frame-ancestors 'none'", "DENY")]
    [InlineData("'self'", "frame-ancestors 'self'", "SAMEORIGIN")]
    [InlineData("https://portal.example.org 'self'", "frame-ancestors https://portal.example.org 'self'", null)]
    public async Task FramingFollowsConfiguration(string? ancestors, string policy, string? frameOptions)
    {
        await using var factory = new ApiFactory
        {
            Settings = new Dictionary<string, string?> { ["Framing:Ancestors"] = ancestors },
        };
        using var client = factory.CreateClient();

        using var page = await client.GetAsync(new Uri("/", UriKind.Relative));

        Assert.Contains(policy + ";", page.Headers.GetValues("Content-Security-Policy").Single(), StringComparison.Ordinal);
        Assert.Equal(frameOptions, page.Headers.TryGetValues("X-Frame-Options", out var values) ? values.Single() : null);
    }

    [Theory]
    [InlineData("Cors:Origins:0", "https://dash.example.org/path")]
    [InlineData("ForwardedHeaders:KnownProxies:0", "not-an-address")]
    [InlineData("ForwardedHeaders:KnownNetworks:0", "10.0.0.0")]
    [InlineData("Framing:Ancestors", "https://a.example.org; script-src *")]
    public void MalformedHttpSettingsStopTheStart(string key, string value)
    {
        using var factory = new ApiFactory { Settings = new Dictionary<string, string?> { [key] = value } };

        var error = Assert.ThrowsAny<Exception>(() => factory.CreateClient());

        Assert.Contains(key.Split(':')[0] + ":" + key.Split(':')[1], error.ToString(), StringComparison.Ordinal);
    }

    private static Task<HttpResponseMessage> GetIfNoneMatchAsync(HttpClient client, string path, EntityTagHeaderValue tag)
    {
        var request = new HttpRequestMessage(HttpMethod.Get, path);
        request.Headers.IfNoneMatch.Add(tag);
        return client.SendAsync(request);
    }

    private static Task<HttpResponseMessage> GetWithOriginAsync(HttpClient client, string origin)
    {
        var request = new HttpRequestMessage(HttpMethod.Get, "/api/v1/sites");
        request.Headers.Add("Origin", origin);
        return client.SendAsync(request);
    }

    private static Task<HttpContext> SendViaAsync(TestServer server, string proxy, string client) =>
        server.SendAsync(context =>
        {
            context.Request.Method = HttpMethods.Get;
            context.Request.Path = "/api/v1/sites";
            context.Connection.RemoteIpAddress = IPAddress.Parse(proxy);
            context.Request.Headers["X-Forwarded-For"] = client;
        });
}
