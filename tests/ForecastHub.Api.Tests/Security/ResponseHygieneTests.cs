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
    public async Task LogsNeverContainAKeyOrTheAuthorizationHeader()
    {
        var logFile = Path.Combine(Path.GetTempPath(), "forecasthub-tests", $"{Guid.NewGuid():N}.log");
        await using (var factory = new ApiFactory
        {
            Settings = new Dictionary<string, string?>
            {
                ["Serilog:MinimumLevel:Default"] = "Debug",
                ["Serilog:Using:0"] = "Serilog.Sinks.File",
                ["Serilog:WriteTo:0:Name"] = "File",
                ["Serilog:WriteTo:0:Args:path"] = logFile,
            },
        })
        {
            using var admin = factory.CreateAdminClient();
            using var client = factory.CreateClient();
            var read = await admin.IssueKey("read");
            var ingest = await admin.IssueKey("ingest", "orchard-1");
            using var ok = await client.GetWith("/api/v1/sites", read.Secret);
            using var forbidden = await client.GetWith("/api/v1/keys", ingest.Secret);
            using var unknown = await client.GetWith("/api/v1/sites", "fhk_unknown-but-secret-looking-value");
            await admin.Revoke(read.Id);
            using var revoked = await client.GetWith("/api/v1/sites", read.Secret);
            var log = ReadShared(logFile);

            Assert.Contains("/api/v1/sites", log, StringComparison.Ordinal);
            Assert.Contains(read.Id, log, StringComparison.Ordinal);
            foreach (var secret in new[] { read.Secret, ingest.Secret, ApiFactory.AdminKey, "fhk_unknown-but-secret-looking-value" })
            {
                Assert.DoesNotContain(secret, log, StringComparison.Ordinal);
            }
            Assert.DoesNotContain("Bearer fhk_", log, StringComparison.Ordinal);
            Assert.DoesNotContain("Bearer test-admin", log, StringComparison.Ordinal);
        }
        File.Delete(logFile);
    }

    [Fact]
    public async Task BodyOverTheEndpointsLimitIsRefusedBeforeItIsRead()
    {
        await using var factory = new ApiFactory { Settings = new Dictionary<string, string?> { ["Limits:DefaultMaxRequestBodyBytes"] = "1000" } };
        using var admin = factory.CreateAdminClient();
        var body = new StringContent($$"""{"id":"orchard-1","name":"{{new string('x', 1200)}}"}""", Encoding.UTF8, "application/json");

        using var response = await admin.PostAsync(new Uri("/api/v1/sites", UriKind.Relative), body);
        using var list = await admin.GetAsync(new Uri("/api/v1/sites", UriKind.Relative));

        var problem = await ProblemAssert.IsProblem(response, HttpStatusCode.RequestEntityTooLarge);
        Assert.Contains("1000 bytes", problem.GetProperty("detail").GetString(), StringComparison.Ordinal);
        Assert.DoesNotContain("orchard-1", await list.Content.ReadAsStringAsync(), StringComparison.Ordinal);
    }

    private static string ReadShared(string path)
    {
        using var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete);
        using var reader = new StreamReader(stream);
        return reader.ReadToEnd();
    }
}
