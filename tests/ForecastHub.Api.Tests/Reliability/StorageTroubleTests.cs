using System.Net;
using ForecastHub.Api.Tests.Infrastructure;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Api.Tests.Reliability;

/// <summary>Storage trouble met while running (real SQLite file): damage found by a read answers a
/// 503 problem naming storage and makes readiness 503; a full store answers 507, keeps what was
/// acknowledged, and readiness recovers once a write succeeds.</summary>
public sealed class StorageTroubleTests
{
    private static readonly Uri Ready = new("/health/ready", UriKind.Relative);

    [Fact]
    public async Task DamageMetByAReadIsA503NamingStorageAndReadinessSaysSo()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        (await client.CreateSite()).Dispose();
        using (var posted = await client.PostReadings(Some.HourlyReadings(5000, ApiFactory.Now.AddDays(-1))))
        {
            Assert.Equal(HttpStatusCode.OK, posted.StatusCode);
        }
        using (var readyBefore = await client.GetAsync(Ready))
        {
            Assert.Equal(HttpStatusCode.OK, readyBefore.StatusCode);
        }

        using (var connection = new SqliteConnection($"Data Source={factory.DatabasePath};Pooling=false"))
        {
            connection.Open();
            using var checkpoint = connection.CreateCommand();
            checkpoint.CommandText = "PRAGMA wal_checkpoint(TRUNCATE);";
            checkpoint.ExecuteNonQuery();
        }
        StartupRefusalTests.Overwrite(factory.DatabasePath, 16 * 1024, seed: 5);
        // Pooled connections keep pages they read before; new ones read the damaged file.
        SqliteConnection.ClearAllPools();

        using var read = await client.GetAsync(Some.Observations(query: "?limit=10000"));
        using var ready = await client.GetAsync(Ready);

        var problem = await ProblemAssert.IsProblem(read, HttpStatusCode.ServiceUnavailable);
        Assert.Contains("storage", problem.GetProperty("detail").GetString(), StringComparison.OrdinalIgnoreCase);
        var notReady = await ProblemAssert.IsProblem(ready, HttpStatusCode.ServiceUnavailable);
        Assert.Contains("damaged", notReady.GetProperty("detail").GetString(), StringComparison.Ordinal);
    }

    [Fact]
    public async Task FullStoreAnswers507KeepsWhatWasAcknowledgedAndRecoversAfterAWrite()
    {
        await using var factory = new ApiFactory { Settings = new Dictionary<string, string?> { ["Storage:MaxSizeMb"] = "1" } };
        using var client = factory.CreateAdminClient();
        (await client.CreateSite()).Dispose();
        var acknowledged = 0;
        HttpResponseMessage? refused = null;
        for (var batch = 0; batch < 40 && refused is null; batch++)
        {
            var end = ApiFactory.Now.AddDays(-1).AddHours(-2000 * batch);
            var response = await client.PostReadings(Some.HourlyReadings(2000, end));
            if (response.StatusCode == HttpStatusCode.OK)
            {
                acknowledged += (await response.Json()).Count("accepted");
                response.Dispose();
            }
            else
            {
                refused = response;
            }
        }

        Assert.NotNull(refused);
        using (refused)
        {
            var problem = await ProblemAssert.IsProblem(refused, HttpStatusCode.InsufficientStorage);
            Assert.Contains("full", problem.GetProperty("detail").GetString(), StringComparison.Ordinal);
        }
        using (var notReady = await client.GetAsync(Ready))
        {
            Assert.Equal(HttpStatusCode.ServiceUnavailable, notReady.StatusCode);
        }
        Assert.True(acknowledged > 0);
        Assert.Equal(acknowledged, (await client.AllReadings()).Count);

        // A write that needs no new space succeeds, and readiness comes back with it.
        using var renamed = await client.PatchAsync(new Uri("/api/v1/sites/orchard-1", UriKind.Relative),
            System.Net.Http.Json.JsonContent.Create(new { name = "renamed" }));
        using var readyAgain = await client.GetAsync(Ready);
        Assert.Equal(HttpStatusCode.OK, renamed.StatusCode);
        Assert.Equal(HttpStatusCode.OK, readyAgain.StatusCode);
    }
}
