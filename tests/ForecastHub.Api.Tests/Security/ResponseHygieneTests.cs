using System.Net;
using System.Text;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Keys;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Api.Tests.Security;

public sealed class ResponseHygieneTests
{
    [Fact]
    public async Task SwaggerPageCarriesTheContentSecurityPolicyAndNoFraming()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateClient();

        using var page = await client.GetAsync(new Uri("/swagger/index.html", UriKind.Relative));

        Assert.Equal(HttpStatusCode.OK, page.StatusCode);
        Assert.Equal("text/html", page.Content.Headers.ContentType?.MediaType);
        var csp = string.Join(";", page.Headers.GetValues("Content-Security-Policy"));
        Assert.Contains("default-src 'self'", csp, StringComparison.Ordinal);
        Assert.Contains("frame-ancestors 'none'", csp, StringComparison.Ordinal);
        Assert.DoesNotContain("script-src 'self' 'unsafe-inline'", csp, StringComparison.Ordinal);
        Assert.Equal("DENY", page.Headers.GetValues("X-Frame-Options").Single());
        Assert.Equal("nosniff", page.Headers.GetValues("X-Content-Type-Options").Single());
        Assert.Equal("no-referrer", page.Headers.GetValues("Referrer-Policy").Single());
    }

    [Fact]
    public async Task JsonAnswersAreNosniffWithoutAPagePolicy()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateClient();

        using var live = await client.GetAsync(new Uri("/health/live", UriKind.Relative));

        Assert.Equal("nosniff", live.Headers.GetValues("X-Content-Type-Options").Single());
        Assert.False(live.Headers.Contains("Content-Security-Policy"));
    }

    [Fact]
    public async Task BrokenStorageAnswersAProblemWithoutInternals()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();
        var key = await admin.IssueKey("read");
        using (var connection = new SqliteConnection($"Data Source={factory.DatabasePath};Pooling=False"))
        {
            connection.Open();
            using var drop = connection.CreateCommand();
            drop.CommandText = "DROP TABLE api_keys;";
            drop.ExecuteNonQuery();
        }
        using var client = factory.CreateClient();

        using var response = await client.GetWith("/api/v1/sites", key.Secret);
        var text = await response.Content.ReadAsStringAsync();

        await ProblemAssert.IsProblem(response, HttpStatusCode.InternalServerError);
        Assert.DoesNotContain("Sqlite", text, StringComparison.OrdinalIgnoreCase);
        Assert.DoesNotContain("api_keys", text, StringComparison.Ordinal);
        Assert.DoesNotContain(".cs", text, StringComparison.Ordinal);
        Assert.DoesNotContain(Path.GetDirectoryName(factory.DatabasePath)!, text, StringComparison.Ordinal);
        Assert.DoesNotContain(key.Secret, text, StringComparison.Ordinal);
    }

    [Fact]
    public async Task BodyOverTheEndpointsOwnLimitIsRefusedBeforeItIsRead()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();
        var body = new StringContent($$"""{"id":"orchard-1","name":"{{new string('x', 70_000)}}"}""", Encoding.UTF8, "application/json");

        using var response = await admin.PostAsync(new Uri("/api/v1/sites", UriKind.Relative), body);
        using var list = await admin.GetAsync(new Uri("/api/v1/sites", UriKind.Relative));

        var problem = await ProblemAssert.IsProblem(response, HttpStatusCode.RequestEntityTooLarge);
        Assert.Contains("65536 bytes", problem.GetProperty("detail").GetString(), StringComparison.Ordinal);
        Assert.DoesNotContain("orchard-1", await list.Content.ReadAsStringAsync(), StringComparison.Ordinal);
    }

    [Fact]
    public async Task EndpointWithoutItsOwnLimitGetsTheConfiguredDefault()
    {
        await using var factory = new ApiFactory { Settings = new Dictionary<string, string?> { ["Limits:DefaultMaxRequestBodyBytes"] = "1000" } };
        using var admin = factory.CreateAdminClient();
        using var request = new HttpRequestMessage(HttpMethod.Delete, new Uri("/api/v1/keys/key-0000000000000000", UriKind.Relative))
        {
            Content = new StringContent(new string('x', 2000), Encoding.UTF8, "text/plain"),
        };

        using var response = await admin.SendAsync(request);

        var problem = await ProblemAssert.IsProblem(response, HttpStatusCode.RequestEntityTooLarge);
        Assert.Contains("1000 bytes", problem.GetProperty("detail").GetString(), StringComparison.Ordinal);
    }
}
