using System.Net;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.TestData;
using Npgsql;

namespace ForecastHub.Api.Tests.Reliability;

/// <summary>
/// The PostgreSQL backend answers storage trouble as the SQLite one does. The test server is made to
/// report it for real: a trigger on the readings table raises the SQLSTATE a full disk (53100) or a
/// damaged page (XX001) would, so the error travels the whole way from the server to the answer.
/// </summary>
public sealed class PostgresStorageTroubleTests
{
    private static readonly Uri Ready = new("/health/ready", UriKind.Relative);

    [Fact]
    public async Task AFullDatabaseAnswers507AndReadinessRecoversAfterAWrite()
    {
        var db = await PostgresServer.Shared.CreateDatabaseAsync();
        try
        {
            await using var factory = OnPostgres(db);
            using var client = factory.CreateAdminClient();
            (await client.CreateSite()).Dispose();
            await FailReadingInsertsAsync(db, "disk_full");

            using (var refused = await client.PostReadings(Some.HourlyReadings(3, ApiFactory.Now.AddDays(-1))))
            {
                var problem = await ProblemAssert.IsProblem(refused, HttpStatusCode.InsufficientStorage);
                Assert.Equal("Storage full", problem.GetProperty("title").GetString());
            }
            using (var notReady = await client.GetAsync(Ready))
            {
                var problem = await ProblemAssert.IsProblem(notReady, HttpStatusCode.ServiceUnavailable);
                Assert.Contains("Storage is full", problem.GetProperty("detail").GetString(), StringComparison.Ordinal);
            }
            Assert.Empty(await client.AllReadings());

            await ExecuteAsync(db, "DROP TRIGGER refuse ON readings;");
            using (var stored = await client.PostReadings(Some.HourlyReadings(3, ApiFactory.Now.AddDays(-1))))
            {
                Assert.Equal(HttpStatusCode.OK, stored.StatusCode);
            }
            using var readyAgain = await client.GetAsync(Ready);
            Assert.Equal(HttpStatusCode.OK, readyAgain.StatusCode);
            Assert.Equal(3, (await client.AllReadings()).Count);
        }
        finally
        {
            await PostgresServer.Shared.DropDatabaseAsync(db);
        }
    }

    [Fact]
    public async Task DamagedDataAnswers503NamingStorageAndReadinessStaysDown()
    {
        var db = await PostgresServer.Shared.CreateDatabaseAsync();
        try
        {
            await using var factory = OnPostgres(db);
            using var client = factory.CreateAdminClient();
            (await client.CreateSite()).Dispose();
            await FailReadingInsertsAsync(db, "data_corrupted");

            using (var refused = await client.PostReadings(Some.HourlyReadings(3, ApiFactory.Now.AddDays(-1))))
            {
                var problem = await ProblemAssert.IsProblem(refused, HttpStatusCode.ServiceUnavailable);
                Assert.Equal("Storage damaged", problem.GetProperty("title").GetString());
            }

            // Damage is not undone by a write that succeeds: readiness stays down until the operator repairs and restarts.
            using (var renamed = await client.PatchAsync(new Uri("/api/v1/sites/orchard-1", UriKind.Relative),
                System.Net.Http.Json.JsonContent.Create(new { name = "renamed" })))
            {
                Assert.Equal(HttpStatusCode.OK, renamed.StatusCode);
            }
            using var notReady = await client.GetAsync(Ready);
            var detail = (await ProblemAssert.IsProblem(notReady, HttpStatusCode.ServiceUnavailable)).GetProperty("detail").GetString();
            Assert.Contains("damaged", detail, StringComparison.Ordinal);
            Assert.Contains("XX001", detail, StringComparison.Ordinal);
        }
        finally
        {
            await PostgresServer.Shared.DropDatabaseAsync(db);
        }
    }

    private static ApiFactory OnPostgres(string connectionString) => new()
    {
        Settings = new Dictionary<string, string?>
        {
            ["Storage:Provider"] = "postgres",
            ["Storage:ConnectionString"] = connectionString,
        },
    };

    /// <summary>Every row written into <c>readings</c> from now on makes the server raise <paramref name="condition"/>.</summary>
    private static Task FailReadingInsertsAsync(string connectionString, string condition) => ExecuteAsync(connectionString, $"""
        CREATE FUNCTION refuse_reading() RETURNS trigger LANGUAGE plpgsql AS $$
        BEGIN RAISE EXCEPTION 'refused by the test server' USING ERRCODE = '{condition}'; END $$;
        CREATE TRIGGER refuse BEFORE INSERT ON readings FOR EACH ROW EXECUTE FUNCTION refuse_reading();
        """);

    private static async Task ExecuteAsync(string connectionString, string sql)
    {
        await using var connection = new NpgsqlConnection(connectionString);
        await connection.OpenAsync();
        await using var command = new NpgsqlCommand(sql, connection);
        await command.ExecuteNonQueryAsync();
    }
}
