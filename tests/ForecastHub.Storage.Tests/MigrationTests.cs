using ForecastHub.Storage.Migrations;

namespace ForecastHub.Storage.Tests;

public sealed class MigrationTests
{
    [Fact]
    public async Task FreshFileIsMigratedToTheLatestVersionInWalMode()
    {
        using var db = new TestDatabase();
        var runner = new MigrationRunner(db.Database);

        var version = await runner.ApplyAsync();

        Assert.Equal(Migration.All[^1].Version, version);
        Assert.Equal("wal", db.Scalar<string>("PRAGMA journal_mode;"));
        Assert.Equal(Migration.All.Count, db.Scalar<int>("SELECT count(*) FROM schema_migrations;"));
    }

    [Fact]
    public async Task ApplyingTwiceChangesNothing()
    {
        using var db = new TestDatabase();
        var runner = new MigrationRunner(db.Database);
        await runner.ApplyAsync();

        var version = await runner.ApplyAsync();

        Assert.Equal(runner.LatestVersion, version);
        Assert.Equal(Migration.All.Count, db.Scalar<int>("SELECT count(*) FROM schema_migrations;"));
    }

    [Fact]
    public async Task DatabaseMadeWithSchemaVersionOneIsUpgradedKeepingItsData()
    {
        using var db = new TestDatabase();
        var runner = new MigrationRunner(db.Database);
        Assert.Equal(1, await runner.ApplyAsync(targetVersion: 1));
        // Rows written the way a version-1 build wrote them.
        db.Execute("""
            INSERT INTO sites (key, id, name, time_zone, cadence, daily_statistic, min_c, max_c, max_step_c_per_hour,
                flatline_hours, seasonality, method, order_policy, max_order, fit_window_days, interval_method, created_at_ms)
            VALUES (1, 'old-site', 'Old site', 'UTC', 'daily', 'max', -60, 60, 10, 6, 'auto', 'burg', 'pacf-aic', 48, 1461,
                'calibrated', 1700000000000);
            INSERT INTO readings (site_key, time_ms, value_c, original_value, original_unit, flags, received_at_ms)
            VALUES (1, 1700000000000, 4.5, 40.1, 'F', 0, 1700000000000), (1, 1700086400000, 70, 70, 'C', 1, 1700086400000);
            """);

        var version = await runner.ApplyAsync();

        Assert.Equal(runner.LatestVersion, version);
        var site = await new Sites.SqliteSiteStore(db.Database, TimeProvider.System).GetAsync("old-site");
        Assert.NotNull(site);
        Assert.Equal(Core.Grid.DailyStatistic.Max, site.DailyStatistic);
        Assert.Equal(1, site.SettingsVersion);
        Assert.Equal(DateTimeOffset.FromUnixTimeMilliseconds(1700000000000), site.UpdatedAt);
        var readings = await new Readings.SqliteReadingStore(db.Database).ReadAsync("old-site", long.MinValue, long.MaxValue, null, 10);
        Assert.NotNull(readings);
        Assert.Equal([40.1, 70], readings.Select(r => r.OriginalValue));
        Assert.Equal("ok", db.Scalar<string>("PRAGMA integrity_check;"));
    }

    [Fact]
    public async Task SitesTableRebuiltForNeverReusedKeysKeepsEveryChildRowAndItsCascades()
    {
        using var db = new TestDatabase();
        var runner = new MigrationRunner(db.Database);
        Assert.Equal(6, await runner.ApplyAsync(targetVersion: 6));
        var sites = new Sites.SqliteSiteStore(db.Database, TimeProvider.System);
        Assert.True(await sites.CreateAsync(SiteStoreTests.Site("kept")));
        Assert.True(await sites.CreateAsync(SiteStoreTests.Site("newest")));
        db.Execute("""
            INSERT INTO readings (site_key, time_ms, value_c, original_value, original_unit, flags, received_at_ms)
            VALUES (1, 1700000000000, 4.5, 4.5, 'C', 0, 1700000000000), (2, 1700000000000, 6, 6, 'C', 0, 1700000000000);
            INSERT INTO site_models (site_key, fitted_at_ms, fit_duration_ms, settings_version, data_end_ms, data_points, model_json)
            VALUES (1, 1700000000000, 1, 1, 1700000000000, 1, '{}');
            INSERT INTO raised_alerts (site_id, threshold_id, window_name, window_from_ms, window_to_ms, raised_at_ms, updated_at_ms, detail_json)
            VALUES ('kept', 'frost', 'night', 0, 1, 0, 0, '{}');
            """);
        Assert.True(await sites.DeleteAsync("newest"));

        Assert.Equal(runner.LatestVersion, await runner.ApplyAsync());

        // Every row of the kept site is still there, under its key.
        Assert.Equal(1, (await sites.GetAsync("kept"))!.Key);
        Assert.Equal(1, db.Scalar<int>("SELECT count(*) FROM readings WHERE site_key = 1;"));
        Assert.Equal(1, db.Scalar<int>("SELECT count(*) FROM site_models WHERE site_key = 1;"));
        Assert.Equal(1, db.Scalar<int>("PRAGMA foreign_keys;"));
        // From now on no key is handed out twice: deleting the newest site and creating one gives a key above every key since.
        Assert.True(await sites.CreateAsync(SiteStoreTests.Site("after")));
        var after = (await sites.GetAsync("after"))!.Key;
        Assert.True(await sites.DeleteAsync("after"));
        Assert.True(await sites.CreateAsync(SiteStoreTests.Site("after")));
        Assert.Equal(after + 1, (await sites.GetAsync("after"))!.Key);
        // The cascades and the trigger of the old table hold on the rebuilt one.
        Assert.True(await sites.DeleteAsync("kept"));
        Assert.Equal(0, db.Scalar<int>("SELECT count(*) FROM readings WHERE site_key = 1;"));
        Assert.Equal(0, db.Scalar<int>("SELECT count(*) FROM site_models;"));
        Assert.Equal(0, db.Scalar<int>("SELECT count(*) FROM raised_alerts;"));
        Assert.Equal("ok", db.Scalar<string>("PRAGMA integrity_check;"));
    }

    [Fact]
    public void ShippedMigrationsAreNumberedFromOneWithoutGaps()
    {
        Assert.Equal(Enumerable.Range(1, Migration.All.Count), Migration.All.Select(m => m.Version));
        Assert.All(Migration.All, m => Assert.False(string.IsNullOrWhiteSpace(m.Sql)));
    }
}
