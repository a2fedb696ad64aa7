using System.Collections.Concurrent;
using System.Diagnostics;
using System.Globalization;
using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Keys;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Quality;
using ForecastHub.Core.Risk;
using ForecastHub.Storage.Postgres;
using ForecastHub.Storage.Postgres.Migrations;
using ForecastHub.Storage.Postgres.Readings;
using ForecastHub.Storage.Postgres.Sites;
using ForecastHub.Storage.Postgres.Webhooks;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Webhooks;
using ForecastHub.TestData;
using Npgsql;

namespace ForecastHub.Api.Tests.Cluster;

/// <summary>
/// Several API nodes as child processes on loopback sharing one PostgreSQL database (a real server
/// started by the tests): what one node writes the others serve, a change through one is honoured
/// by the others, and background fits run once across the cluster, surviving a node killed mid-fit.
/// </summary>
[Trait("Category", "Process")]
public sealed class ClusterTests
{
    private static readonly TimeSpan Patience = TimeSpan.FromSeconds(120);

    [Fact]
    public async Task WritesThroughOneNodeAreServedAndHonouredByTheOthers()
    {
        var db = await PostgresServer.Shared.CreateDatabaseAsync();
        try
        {
            await using var a = await ServiceProcess.StartOnPostgresAsync(db, "--Cluster:NodeName=a");
            await using var b = await ServiceProcess.StartOnPostgresAsync(db, "--Cluster:NodeName=b");
            await using var c = await ServiceProcess.StartOnPostgresAsync(db, "--Cluster:NodeName=c");
            using var viaA = a.CreateAdminClient();
            using var viaB = b.CreateAdminClient();
            using var viaC = c.CreateAdminClient();

            // Ingest through A, read the same readings through B and C.
            using (var created = await viaA.CreateSite(Some.Site(model: new { maxOrder = 6, fitWindowDays = 30 })))
            {
                Assert.Equal(HttpStatusCode.Created, created.StatusCode);
            }
            var readings = Some.HourlyReadings(10 * 24, DateTimeOffset.UtcNow);
            using (var posted = await viaA.PostReadings(readings))
            {
                Assert.Equal(HttpStatusCode.OK, posted.StatusCode);
            }
            foreach (var other in new[] { viaB, viaC })
            {
                var stored = await other.AllReadings();
                Assert.Equal(readings.Select(r => (Some.Iso(r.Time), r.Value)),
                    stored.Select(r => (r.GetProperty("time").GetString()!, r.GetProperty("value").GetDouble())));
            }

            // A fits after its ingest; C serves that model. A settings change through B refits, and C serves the new model.
            Assert.Equal(1, (await WaitForModelAsync(viaC, settingsVersion: 1)).GetProperty("settingsVersion").GetInt64());
            using (var patched = await viaB.PatchAsJsonAsync(new Uri("/api/v1/sites/orchard-1", UriKind.Relative), new { model = new { maxOrder = 3 } }))
            {
                Assert.Equal(HttpStatusCode.OK, patched.StatusCode);
            }
            var refitted = await WaitForModelAsync(viaC, settingsVersion: 2);
            Assert.Equal(3, refitted.GetProperty("settings").GetProperty("maxOrder").GetInt32());

            // A key revoked through A is refused by C within one second (C had it cached as verified).
            var key = await viaA.IssueKey("read");
            using (var before = await viaC.GetWith("/api/v1/sites/orchard-1", key.Secret))
            {
                Assert.Equal(HttpStatusCode.OK, before.StatusCode);
            }
            await viaA.Revoke(key.Id);
            var sinceRevoked = Stopwatch.StartNew();
            HttpStatusCode status;
            do
            {
                using var after = await viaC.GetWith("/api/v1/sites/orchard-1", key.Secret);
                status = after.StatusCode;
            }
            while (status == HttpStatusCode.OK && sinceRevoked.Elapsed < TimeSpan.FromSeconds(1));
            Assert.Equal(HttpStatusCode.Unauthorized, status);
        }
        finally
        {
            await PostgresServer.Shared.DropDatabaseAsync(db);
        }
    }

    [Fact]
    public async Task FiftyDueSitesAreFittedExactlyOnceAcrossThreeNodes()
    {
        var db = await PostgresServer.Shared.CreateDatabaseAsync();
        try
        {
            await SeedAsync(db, Enumerable.Range(0, 50).Select(i => $"due-{i:D2}"), days: 10, maxOrder: 4);

            var nodes = await Task.WhenAll(new[] { "a", "b", "c" }.Select(n => ServiceProcess.StartOnPostgresAsync(db, $"--Cluster:NodeName={n}")));
            try
            {
                var clients = nodes.Select(n => n.CreateAdminClient()).ToArray();
                await WaitUntilAsync(async () => await ScalarAsync<long>(db, "SELECT count(*) FROM site_models;") == 50
                    && await ScalarAsync<long>(db, "SELECT count(*) FROM work_leases WHERE kind = 'refit';") == 0
                    && (await Task.WhenAll(clients.Select(c => MetricAsync(c, "forecasthub_refit_queue_length")))).All(q => q == 0));

                var fits = await Task.WhenAll(clients.Select(c => MetricAsync(c, "forecasthub_fits_total{outcome=\"ok\"}")));
                Assert.Equal(50, fits.Sum());
                foreach (var client in clients)
                {
                    client.Dispose();
                }
            }
            finally
            {
                foreach (var node in nodes)
                {
                    await node.DisposeAsync();
                }
            }
        }
        finally
        {
            await PostgresServer.Shared.DropDatabaseAsync(db);
        }
    }

    [Fact]
    public async Task EveryAcknowledgedReadingSurvivesKillingTheNodeMidIngest()
    {
        var db = await PostgresServer.Shared.CreateDatabaseAsync();
        try
        {
            await using var a = await ServiceProcess.StartOnPostgresAsync(db, "--Cluster:NodeName=a");
            await using var b = await ServiceProcess.StartOnPostgresAsync(db, "--Cluster:NodeName=b");
            using var viaA = a.CreateAdminClient();
            using var viaB = b.CreateAdminClient();
            var loggers = new[] { "logger-1", "logger-2" };
            foreach (var id in loggers)
            {
                using var created = await viaA.CreateSite(Some.Site(id));
                Assert.Equal(HttpStatusCode.Created, created.StatusCode);
            }

            // Two loggers send batches through A until A is killed under them.
            var start = new DateTimeOffset(2024, 1, 1, 0, 0, 0, TimeSpan.Zero);
            var acknowledged = new ConcurrentDictionary<(string Site, int Batch), bool>();
            using var enough = new SemaphoreSlim(0);
            var senders = loggers.Select(site => Task.Run(async () =>
            {
                for (var batch = 0; ; batch++)
                {
                    try
                    {
                        using var response = await viaA.PostReadings(Batch(start, batch), site);
                        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
                        acknowledged[(site, batch)] = true;
                        if (acknowledged.Count == 6)
                        {
                            enough.Release();
                        }
                    }
                    catch (Exception e) when (e is HttpRequestException or TaskCanceledException)
                    {
                        return;
                    }
                }
            })).ToArray();
            Assert.True(await enough.WaitAsync(Patience));
            await a.KillAsync();
            await Task.WhenAll(senders);

            foreach (var site in loggers)
            {
                var stored = (await viaB.AllReadings(site)).Select(r => r.GetProperty("time").GetString()).ToHashSet();
                foreach (var ((ackedSite, batch), _) in acknowledged.Where(x => x.Key.Site == site))
                {
                    Assert.All(Batch(start, batch), r => Assert.Contains(Some.Iso(r.Time), stored));
                }
            }
        }
        finally
        {
            await PostgresServer.Shared.DropDatabaseAsync(db);
        }
    }

    [Fact]
    public async Task AFitHeldByAKilledNodeIsDoneByAnotherOnceTheLeaseRunsOut()
    {
        var db = await PostgresServer.Shared.CreateDatabaseAsync();
        try
        {
            await SeedAsync(db, ["slow"], days: 60, maxOrder: 8);
            string[] settings = ["--Cluster:LeaseDuration=00:00:03", "--Refit:SweepInterval=00:00:01"];

            // While this transaction holds the table, models can be read but not written: A's fit cannot finish before it is killed.
            await using var blocker = new NpgsqlConnection(db);
            await blocker.OpenAsync();
            await using (var hold = await blocker.BeginTransactionAsync())
            {
                await using (var lockModels = new NpgsqlCommand("LOCK TABLE site_models IN EXCLUSIVE MODE;", blocker, hold))
                {
                    await lockModels.ExecuteNonQueryAsync();
                }

                var a = await ServiceProcess.StartOnPostgresAsync(db, ["--Cluster:NodeName=a", .. settings]);
                try
                {
                    // A's start sweep takes the site's refit lease; A dies with it, mid-fit.
                    await WaitUntilAsync(async () => await ScalarAsync<long>(db,
                        "SELECT count(*) FROM work_leases WHERE kind = 'refit' AND subject = 'slow' AND holder = 'a';") == 1);
                    await a.KillAsync();
                }
                finally
                {
                    await a.DisposeAsync();
                }
                await hold.RollbackAsync();
            }
            Assert.Equal(0, await ScalarAsync<long>(db, "SELECT count(*) FROM site_models;"));
            var leaseExpiry = await ScalarAsync<DateTime>(db, "SELECT expires_at FROM work_leases WHERE kind = 'refit' AND subject = 'slow' AND holder = 'a';");

            await using var b = await ServiceProcess.StartOnPostgresAsync(db, ["--Cluster:NodeName=b", .. settings]);
            using var viaB = b.CreateAdminClient();
            await WaitUntilAsync(async () => await ScalarAsync<long>(db, "SELECT count(*) FROM site_models;") == 1);

            var fittedAt = DateTimeOffset.FromUnixTimeMilliseconds(await ScalarAsync<long>(db, "SELECT fitted_at_ms FROM site_models;"));
            Assert.True(fittedAt.UtcDateTime >= leaseExpiry.AddSeconds(-1), $"fitted at {fittedAt:O}, lease ran to {leaseExpiry:O}");
            Assert.Equal(1, await MetricAsync(viaB, "forecasthub_fits_total{outcome=\"ok\"}"));
        }
        finally
        {
            await PostgresServer.Shared.DropDatabaseAsync(db);
        }
    }

    [Fact]
    public async Task TwoNodesSweepingTogetherEvaluateEachSiteOnceAndSendEachRiskOnce()
    {
        var db = await PostgresServer.Shared.CreateDatabaseAsync();
        await using var receiver = await Webhooks.WebhookReceiver.StartAsync();
        try
        {
            var siteIds = Enumerable.Range(0, 12).Select(i => $"warm-{i:D2}").ToList();
            await SeedAsync(db, siteIds, days: 10, maxOrder: 4);
            await using (var fitter = await ServiceProcess.StartOnPostgresAsync(db, "--Cluster:NodeName=fitter"))
            {
                await WaitUntilAsync(async () => await ScalarAsync<long>(db, "SELECT count(*) FROM site_models;") == siteIds.Count
                    && await ScalarAsync<long>(db, "SELECT count(*) FROM work_leases WHERE kind = 'refit';") == 0);
            }

            // The fitter's start-up sweep claimed the sites it reached for half a period; the thresholds below
            // are written past the API (which would queue an evaluation), so those claims are given up here.
            Assert.True(await ScalarAsync<long>(db, "SELECT count(*) FROM work_leases WHERE kind = 'alert-sweep' AND holder = 'fitter';") > 0);
            await ScalarAsync<long>(db, "WITH gone AS (DELETE FROM work_leases WHERE kind = 'alert-sweep' RETURNING 1) SELECT count(*) FROM gone;");

            // Above -40 C every sample path crosses, in both windows; both nodes find that in their start-up sweep at the same time.
            await using (var database = new PostgresDatabase(db))
            {
                var sites = new PostgresSiteStore(database, TimeProvider.System);
                foreach (var id in siteIds)
                {
                    Assert.NotNull(await sites.UpdateAsync(id, s => s with
                    {
                        Risk = s.Risk with { Thresholds = [new SiteThreshold("warm", ThresholdDirection.Above, -40, 0.5)] },
                    }));
                }
                Assert.True(await new PostgresWebhookStore(database).CreateAsync(new WebhookRecord("wh-1", receiver.Url,
                    "whsec_" + Convert.ToBase64String(new byte[32]), [], ["risk"], DateTimeOffset.UtcNow)));
            }

            var nodes = await Task.WhenAll(new[] { "a", "b" }.Select(n =>
                ServiceProcess.StartOnPostgresAsync(db, $"--Cluster:NodeName={n}", "--Webhooks:AllowPrivateNetworks=true")));
            try
            {
                var expected = siteIds.Count * 2;
                await WaitUntilAsync(async () =>
                    await ScalarAsync<long>(db, "SELECT count(*) FROM webhook_deliveries WHERE status = 'delivered';") >= expected);

                Assert.Equal(expected, await ScalarAsync<long>(db, "SELECT count(*) FROM raised_alerts;"));
                Assert.Equal(expected, await ScalarAsync<long>(db, "SELECT count(*) FROM webhook_deliveries;"));
                Assert.Equal(expected, await ScalarAsync<long>(db, "SELECT count(*) FROM webhook_deliveries WHERE event_type = 'risk.raised' AND attempts = 1;"));
                var received = new List<Webhooks.ReceivedDelivery>();
                while (receiver.HasMore)
                {
                    received.Add(await receiver.NextAsync(Patience));
                }
                Assert.Equal(expected, received.Count);
                Assert.Equal(expected, received.Select(r => r.Id).Distinct().Count());

                // Each site was swept by one of the two nodes: one claim per site, held by a or b.
                Assert.Equal(siteIds.Count, await ScalarAsync<long>(db, "SELECT count(*) FROM work_leases WHERE kind = 'alert-sweep' AND holder IN ('a', 'b');"));
            }
            finally
            {
                foreach (var node in nodes)
                {
                    await node.DisposeAsync();
                }
            }
        }
        finally
        {
            await PostgresServer.Shared.DropDatabaseAsync(db);
        }
    }

    private static IEnumerable<(DateTimeOffset Time, double Value)> Batch(DateTimeOffset start, int batch) =>
        Enumerable.Range(0, 200).Select(i => (start.AddMinutes((batch * 200) + i), Math.Round(10 + (3 * Math.Sin(((batch * 200) + i) / 90.0)), 2)));

    // Sites and hourly readings written straight through the PostgreSQL stores, before any node runs.
    private static async Task SeedAsync(string connectionString, IEnumerable<string> siteIds, int days, int maxOrder)
    {
        await using var database = new PostgresDatabase(connectionString);
        await new PostgresMigrationRunner(database).ApplyAsync();
        var sites = new PostgresSiteStore(database, TimeProvider.System);
        var readings = new PostgresReadingStore(database);
        var now = DateTimeOffset.UtcNow;
        var hourly = Some.HourlyReadings(days * 24, now)
            .Select((r, i) => new IncomingReading(i, r.Time.ToUnixTimeMilliseconds(), r.Value, r.Value, "C")).ToArray();
        foreach (var id in siteIds)
        {
            Assert.True(await sites.CreateAsync(new SiteRecord(id, id, "UTC", ForecastHub.Core.Grid.GridCadence.Hourly, null, null, null, null, QualityLimits.Default,
                new ForecastHub.Core.Modeling.ModelSettings { MaxOrder = maxOrder, FitWindowDays = days }, now, now)));
            await readings.IngestAsync(id, hourly, ConflictPolicy.Reject, now);
        }
    }

    private static async Task<JsonElement> WaitForModelAsync(HttpClient client, long settingsVersion)
    {
        JsonElement model = default;
        await WaitUntilAsync(async () =>
        {
            using var response = await client.GetAsync(new Uri("/api/v1/sites/orchard-1/model", UriKind.Relative));
            if (response.StatusCode != HttpStatusCode.OK)
            {
                return false;
            }
            model = await response.Content.ReadFromJsonAsync<JsonElement>();
            return model.GetProperty("settingsVersion").GetInt64() == settingsVersion;
        });
        return model;
    }

    private static async Task<double> MetricAsync(HttpClient client, string series)
    {
        var text = await client.GetStringAsync(new Uri("/metrics", UriKind.Relative));
        var line = text.Split('\n').FirstOrDefault(l => l.StartsWith(series + " ", StringComparison.Ordinal));
        return line is null ? 0 : double.Parse(line[(series.Length + 1)..], CultureInfo.InvariantCulture);
    }

    private static async Task<T> ScalarAsync<T>(string connectionString, string sql)
    {
        await using var connection = new NpgsqlConnection(connectionString);
        await connection.OpenAsync();
        await using var command = new NpgsqlCommand(sql, connection);
        return (T)(await command.ExecuteScalarAsync())!;
    }

    private static async Task WaitUntilAsync(Func<Task<bool>> condition)
    {
        var deadline = Stopwatch.StartNew();
        while (!await condition())
        {
            if (deadline.Elapsed > Patience)
            {
                throw new TimeoutException("The cluster did not reach the expected state in time.");
            }
            // Polling child processes; there is no clock to advance here.
            await Task.Delay(50);
        }
    }
}
