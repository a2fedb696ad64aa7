using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Quality;
using ForecastHub.Storage.Migrations;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Storage.Tests;

public sealed class SiteStoreTests
{
    private static readonly DateTimeOffset Created = new(2025, 1, 1, 0, 0, 0, TimeSpan.Zero);

    internal static SiteRecord Site(string id = "site-a") => new(id, "Site A", "UTC", GridCadence.Hourly, null, 1, 2, 3,
        QualityLimits.Default, ModelSettings.DefaultFor(GridCadence.Hourly), Created, Created);

    internal static async Task<TestDatabase> Migrated()
    {
        var db = new TestDatabase();
        await new MigrationRunner(db.Database).ApplyAsync();
        return db;
    }

    [Fact]
    public async Task StoredSiteReadsBackEqual()
    {
        using var db = await Migrated();
        var store = new SqliteSiteStore(db.Database, TimeProvider.System);

        Assert.True(await store.CreateAsync(Site()));

        var stored = await store.GetAsync("site-a");
        Assert.Equal(Site() with { Key = stored!.Key }, stored);
        Assert.False(await store.CreateAsync(Site()));
    }

    [Fact]
    public async Task UpdateThatChangesNothingKeepsVersionAndTime()
    {
        using var db = await Migrated();
        var store = new SqliteSiteStore(db.Database, TimeProvider.System);
        await store.CreateAsync(Site());

        var same = await store.UpdateAsync("site-a", s => s);
        var changed = await store.UpdateAsync("site-a", s => s with { Model = s.Model with { MaxOrder = 10 } });

        Assert.Equal(Site() with { Key = same!.Key }, same);
        Assert.Equal(2, changed!.SettingsVersion);
        Assert.Equal(10, (await store.GetAsync("site-a"))!.Model.MaxOrder);
    }

    [Fact]
    public async Task DeletingASiteDeletesItsReadings()
    {
        using var db = await Migrated();
        var store = new SqliteSiteStore(db.Database, TimeProvider.System);
        await store.CreateAsync(Site());
        var readings = new Readings.SqliteReadingStore(db.Database);
        await readings.IngestAsync("site-a", [new(0, 1_000, 5, 5, "C")], Readings.ConflictPolicy.Reject, Created);

        Assert.True(await store.DeleteAsync("site-a"));

        Assert.Equal(0, db.Scalar<int>("SELECT count(*) FROM readings;"));
        Assert.Null(await readings.ReadAsync("site-a", 0, long.MaxValue, null, 10));
    }
}
