using System.Net;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Keys;

namespace ForecastHub.Api.Tests.Security;

public sealed class RateLimitTests
{
    private const string SitesPath = "/api/v1/sites";

    private static ApiFactory LimitedFactory(int perKey, int anonymous = 1000) => new()
    {
        Settings = new Dictionary<string, string?>
        {
            ["RateLimiting:PermitsPerWindow"] = perKey.ToString(System.Globalization.CultureInfo.InvariantCulture),
            ["RateLimiting:AnonymousPermitsPerWindow"] = anonymous.ToString(System.Globalization.CultureInfo.InvariantCulture),
            ["RateLimiting:WindowSeconds"] = "3600",
        },
    };

    [Fact]
    public async Task KeyOverItsLimitGets429WithRetryAfterWhileOtherKeysGoOn()
    {
        await using var factory = LimitedFactory(perKey: 3);
        using var admin = factory.CreateAdminClient();
        using var client = factory.CreateClient();
        var busy = await admin.IssueKey("read");
        var calm = await admin.IssueKey("read");

        var statuses = new List<HttpStatusCode>();
        for (var i = 0; i < 4; i++)
        {
            using var response = await client.GetWith(SitesPath, busy.Secret);
            statuses.Add(response.StatusCode);
        }
        using var limited = await client.GetWith(SitesPath, busy.Secret);
        using var other = await client.GetWith(SitesPath, calm.Secret);

        Assert.Equal([HttpStatusCode.OK, HttpStatusCode.OK, HttpStatusCode.OK, HttpStatusCode.TooManyRequests], statuses);
        await ProblemAssert.IsProblem(limited, HttpStatusCode.TooManyRequests);
        var retryAfter = limited.Headers.RetryAfter?.Delta;
        Assert.NotNull(retryAfter);
        Assert.InRange(retryAfter.Value.TotalSeconds, 1, 3600);
        Assert.Equal(HttpStatusCode.OK, other.StatusCode);
    }

    [Fact]
    public async Task RetryAfterIsTheSecondsLeftInTheWindowAndTheWindowReopens()
    {
        await using var factory = LimitedFactory(perKey: 1);
        using var admin = factory.CreateAdminClient();
        using var client = factory.CreateClient();
        var key = await admin.IssueKey("read");

        using var first = await client.GetWith(SitesPath, key.Secret);
        using var atOnce = await client.GetWith(SitesPath, key.Secret);
        factory.Clock.Advance(TimeSpan.FromSeconds(3599.5 - 1200));
        using var later = await client.GetWith(SitesPath, key.Secret);
        factory.Clock.Advance(TimeSpan.FromSeconds(1200.5));
        using var reopened = await client.GetWith(SitesPath, key.Secret);

        Assert.Equal(HttpStatusCode.OK, first.StatusCode);
        Assert.Equal(TimeSpan.FromSeconds(3600), atOnce.Headers.RetryAfter?.Delta);
        // 0.5 s left rounds up to a whole second.
        Assert.Equal(TimeSpan.FromSeconds(1201), later.Headers.RetryAfter?.Delta);
        Assert.Equal(HttpStatusCode.TooManyRequests, later.StatusCode);
        Assert.Equal(HttpStatusCode.OK, reopened.StatusCode);
    }

    [Fact]
    public async Task CallersWithoutAValidKeyShareTheirAddressLimit()
    {
        await using var factory = LimitedFactory(perKey: 1000, anonymous: 2);
        using var client = factory.CreateClient();

        using var first = await client.GetWith(SitesPath, null);
        using var second = await client.GetWith(SitesPath, "fhk_not-a-key");
        using var third = await client.GetWith(SitesPath, null);

        Assert.Equal(HttpStatusCode.Unauthorized, first.StatusCode);
        Assert.Equal(HttpStatusCode.Unauthorized, second.StatusCode);
        Assert.Equal(HttpStatusCode.TooManyRequests, third.StatusCode);
    }

    [Fact]
    public async Task HealthProbesAreNeverLimited()
    {
        await using var factory = LimitedFactory(perKey: 1, anonymous: 1);
        using var client = factory.CreateClient();

        for (var i = 0; i < 5; i++)
        {
            using var live = await client.GetWith("/health/live", null);
            using var ready = await client.GetWith("/health/ready", null);

            Assert.Equal(HttpStatusCode.OK, live.StatusCode);
            Assert.Equal(HttpStatusCode.OK, ready.StatusCode);
        }
    }

    [Fact]
    public async Task LimitsCanBeSwitchedOff()
    {
        await using var factory = new ApiFactory
        {
            Settings = new Dictionary<string, string?> { ["RateLimiting:Enabled"] = "false", ["RateLimiting:AnonymousPermitsPerWindow"] = "1" },
        };
        using var client = factory.CreateClient();

        for (var i = 0; i < 3; i++)
        {
            using var response = await client.GetWith(SitesPath, null);

            Assert.Equal(HttpStatusCode.Unauthorized, response.StatusCode);
        }
    }
}
