using ForecastHub.Storage.Postgres;
using ForecastHub.Storage.Postgres.Cluster;
using ForecastHub.Storage.Postgres.Keys;
using ForecastHub.Storage.Postgres.Migrations;
using ForecastHub.Storage.Postgres.Sites;
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
}
