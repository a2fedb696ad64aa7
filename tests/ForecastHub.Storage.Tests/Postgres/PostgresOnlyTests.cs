using ForecastHub.Core.Quality;
using ForecastHub.Storage.Keys;
using ForecastHub.Storage.Postgres;
using ForecastHub.Storage.Postgres.Cluster;
using ForecastHub.Storage.Postgres.Keys;
using ForecastHub.Storage.Postgres.Migrations;
using ForecastHub.Storage.Postgres.Readings;
using ForecastHub.Storage.Postgres.Sites;
using ForecastHub.Storage.Readings;
using Npgsql;

namespace ForecastHub.Storage.Tests.Postgres;

/// <summary>What only the PostgreSQL backend has: migrations shared by nodes, durability settings and change notices.</summary>
public sealed class PostgresOnlyTests
{
    [Fact]
    public async Task NodesStartingTogetherMigrateTheDatabaseOnce()
    {
        await using var db = await PostgresTestDatabase.CreateAsync(migrated: false);
        var runner = new PostgresMigrationRunner(db.Database);
        Assert.Equal(0, await runner.CurrentVersionAsync());

        var versions = await Task.WhenAll(Enumerable.Range(0, 3).Select(_ => Task.Run(() => runner.ApplyAsync())));

        Assert.All(versions, v => Assert.Equal(runner.LatestVersion, v));
        Assert.Equal(runner.LatestVersion, await runner.CurrentVersionAsync());
        Assert.Equal(PostgresMigrationRunner.All.Count, await db.ScalarAsync<int>("SELECT count(*) FROM schema_migrations;"));
    }

    [Fact]
    public async Task NodesStartingTogetherStoreOneFirstAdminKey()
    {
        await using var db = await PostgresTestDatabase.CreateAsync();
        var nodes = Enumerable.Range(0, 6).Select(_ => new PostgresApiKeyStore(db.Database)).ToArray();

        // The race is timing-dependent, so it is run many times, each from an empty key table.
        for (var round = 0; round < 20; round++)
        {
            Assert.Equal(round == 0 ? 0 : 1, await db.ScalarAsync<long>("WITH gone AS (DELETE FROM api_keys RETURNING 1) SELECT count(*) FROM gone;"));
            using var go = new ManualResetEventSlim();
            var starts = nodes.Select((node, i) => Task.Run(() =>
            {
                go.Wait();
                return node.CreateFirstAdminAsync(new ApiKeyRecord($"key-{round:D8}{i:D8}", System.Security.Cryptography.SHA256.HashData([(byte)round, (byte)i]),
                    "admin", [], "generated at first start", DateTimeOffset.UtcNow, null));
            })).ToArray();
            go.Set();

            Assert.Single(await Task.WhenAll(starts), s => s);
            Assert.Equal(1, await db.ScalarAsync<long>("SELECT count(*) FROM api_keys WHERE scope = 'admin';"));
        }
    }

    [Fact]
    public void ShippedMigrationsAreNumberedFromOneWithoutGaps() =>
        Assert.Equal(Enumerable.Range(1, PostgresMigrationRunner.All.Count), PostgresMigrationRunner.All.Select(m => m.Version));

    [Fact]
    public async Task EveryConnectionCommitsSynchronously()
    {
        await using var db = await PostgresTestDatabase.CreateAsync(migrated: false);

        Assert.Equal("on", await db.ScalarAsync<string>("SHOW synchronous_commit;"));
    }

    [Fact]
    public async Task ChangesReachListenersWhenTheyCommitAndOnlyThen()
    {
        await using var db = await PostgresTestDatabase.CreateAsync();
        await using var listener = await db.Database.OpenAsync();
        var heard = new List<string>();
        listener.Notification += (_, e) => heard.Add(e.Payload);
        await using (var listen = new NpgsqlCommand($"LISTEN {PostgresDatabase.ChangeChannel};", listener))
        {
            await listen.ExecuteNonQueryAsync();
        }
        var sites = new PostgresSiteStore(db.Database, TimeProvider.System);
        var keys = new PostgresApiKeyStore(db.Database);

        await sites.CreateAsync(SiteStoreTests.Site());
        // A change that throws inside its transaction rolls back, and its notice with it.
        await Assert.ThrowsAsync<InvalidOperationException>(() => sites.UpdateAsync("site-a",
            s => throw new InvalidOperationException("refused")));
        await sites.UpdateAsync("site-a", s => s with { Name = "Renamed" });
        await keys.CreateAsync(new Storage.Keys.ApiKeyRecord("k1", [9], "read", [], null, DateTimeOffset.UnixEpoch, null));
        await keys.RevokeAsync("k1", DateTimeOffset.UnixEpoch);

        using var timeout = new CancellationTokenSource(TimeSpan.FromSeconds(30));
        while (heard.Count < 4)
        {
            await listener.WaitAsync(timeout.Token);
        }
        Assert.Equal(["site:site-a", "site:site-a", "key:k1", "key:k1"], heard);
        Assert.Equal(new ChangeNotice(ChangeKind.Key, "k1"), ChangeNotice.Parse(heard[^1]));
        Assert.Null(ChangeNotice.Parse("unknown:x"));
    }

    [Fact]
    public async Task ABatchCancelledWhileWritingStoresNothingAndItsRetryMatchesSqlite()
    {
        await using var pg = await PostgresTestDatabase.CreateAsync();
        await using var sqlite = await Backend.CreateAsync("sqlite");
        var readings = new PostgresReadingStore(pg.Database);
        Assert.True(await new PostgresSiteStore(pg.Database, TimeProvider.System).CreateAsync(SiteStoreTests.Site()));
        Assert.True(await sqlite.Sites.CreateAsync(SiteStoreTests.Site()));
        var received = new DateTimeOffset(2025, 1, 1, 0, 0, 0, TimeSpan.Zero);
        var stored = BothBackendsTests.Hourly(0, 1_000, BothBackendsTests.Wave);
        // Overlaps the stored hours (duplicates, a conflict every 25 hours) and adds new ones with a spike.
        var batch = BothBackendsTests.Hourly(900, 1_100, i => i == 1_500 ? 45 : BothBackendsTests.Wave(i) + (i % 25 == 0 ? 2 : 0));
        await readings.IngestAsync("site-a", stored, ConflictPolicy.Reject, received);
        await sqlite.Readings.IngestAsync("site-a", stored, ConflictPolicy.Reject, received);

        // Another session holds the table, so the attempt stops at its write, after it planned the batch; then it is cancelled.
        await using (var blocker = await pg.Database.OpenAsync())
        await using (var hold = await blocker.BeginTransactionAsync())
        {
            await using (var lockTable = new NpgsqlCommand("LOCK TABLE readings IN EXCLUSIVE MODE;", blocker, hold))
            {
                await lockTable.ExecuteNonQueryAsync();
            }
            using var cancel = new CancellationTokenSource();
            var attempt = readings.IngestAsync("site-a", batch, ConflictPolicy.Reject, received.AddHours(1), cancellationToken: cancel.Token);
            using var patience = new CancellationTokenSource(TimeSpan.FromSeconds(30));
            while (await pg.ScalarAsync<long>("SELECT count(*) FROM pg_stat_activity WHERE wait_event_type = 'Lock' AND query LIKE 'COPY readings%';") == 0)
            {
                await Task.Delay(10, patience.Token);
            }
            await cancel.CancelAsync();
            await Assert.ThrowsAnyAsync<OperationCanceledException>(() => attempt);
        }
        Assert.Equal(1_000, (await readings.SpanAsync("site-a"))!.Value.Count);

        var retried = await readings.IngestAsync("site-a", batch, ConflictPolicy.Reject, received.AddHours(2));
        var expected = await sqlite.Readings.IngestAsync("site-a", batch, ConflictPolicy.Reject, received.AddHours(2));

        Assert.Equal(expected!.Outcomes, retried!.Outcomes);
        Assert.Equal(4, retried.Outcomes.Count(o => o.Kind == ReadingOutcomeKind.Conflict));
        Assert.Contains(retried.Outcomes, o => o.Flags.HasFlag(QualityFlags.Spike));
        Assert.Equal(await sqlite.Readings.ReadAsync("site-a", long.MinValue, long.MaxValue, null, 5_000),
            await readings.ReadAsync("site-a", long.MinValue, long.MaxValue, null, 5_000));
    }

    [Fact]
    public async Task ReadingsStoredBeforeVersionFourStayAndGoWithTheirSite()
    {
        await using var pg = await PostgresTestDatabase.CreateAsync(migrated: false);
        var runner = new PostgresMigrationRunner(pg.Database);
        await runner.ApplyAsync(3);
        var sites = new PostgresSiteStore(pg.Database, TimeProvider.System);
        var readings = new PostgresReadingStore(pg.Database);
        Assert.True(await sites.CreateAsync(SiteStoreTests.Site()));
        Assert.True(await sites.CreateAsync(SiteStoreTests.Site("site-b")));
        await readings.IngestAsync("site-a", BothBackendsTests.Hourly(0, 48, BothBackendsTests.Wave), ConflictPolicy.Reject, DateTimeOffset.UnixEpoch);
        await readings.IngestAsync("site-b", BothBackendsTests.Hourly(0, 24, BothBackendsTests.Wave), ConflictPolicy.Reject, DateTimeOffset.UnixEpoch);

        await runner.ApplyAsync();

        Assert.Equal(48, (await readings.SpanAsync("site-a"))!.Value.Count);
        Assert.True(await sites.DeleteAsync("site-a"));
        Assert.Equal(24, await pg.ScalarAsync<long>("SELECT count(*) FROM readings;"));
        Assert.Equal(24, (await readings.SpanAsync("site-b"))!.Value.Count);
    }
}
