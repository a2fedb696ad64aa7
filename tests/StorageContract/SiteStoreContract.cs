using ForecastHub.Core.Climatology;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Risk;

namespace ForecastHub.Storage.Contract;

/// <summary>What every <see cref="Sites.ISiteStore"/> must do.</summary>
public abstract class SiteStoreContract : StorageContract
{
    [Fact]
    public async Task CreatedSiteReadsBackEqualWithItsTypedSettings()
    {
        var hourly = Site("hourly-site") with { Latitude = null, Longitude = null, ElevationM = null };
        var daily = Site("daily-site", GridCadence.Daily) with
        {
            Model = ModelSettings.DefaultFor(GridCadence.Daily) with { Seasonality = Seasonality.AnnualDiurnal, MaxOrder = 7, IntervalMethod = IntervalMethod.Gaussian },
        };

        Assert.True(await Backend.Sites.CreateAsync(hourly));
        Assert.True(await Backend.Sites.CreateAsync(daily));

        var (storedHourly, storedDaily) = (await Backend.Sites.GetAsync("hourly-site"), await Backend.Sites.GetAsync("daily-site"));
        Assert.Equal(hourly with { Key = storedHourly!.Key }, storedHourly);
        Assert.Equal(daily with { Key = storedDaily!.Key }, storedDaily);
        Assert.NotEqual(storedHourly.Key, storedDaily.Key);
    }

    [Fact]
    public async Task ThresholdsAndNightReadBackEqualAndTheirChangeKeepsTheSettingsVersion()
    {
        var site = await CreateSiteAsync();
        Assert.Equal(SiteRiskSettings.Default, site.Risk);
        var risk = new SiteRiskSettings(
            [new SiteThreshold("frost", ThresholdDirection.Below, -1.5, 0.3), new SiteThreshold("heat", ThresholdDirection.Above, 31, null)],
            new NightHours(new TimeOnly(20, 30), new TimeOnly(7, 0)));
        Clock.Advance(TimeSpan.FromMinutes(5));

        var updated = await Backend.Sites.UpdateAsync(site.Id, s => s with { Risk = risk });
        Clock.Advance(TimeSpan.FromMinutes(5));
        var again = await Backend.Sites.UpdateAsync(site.Id, s => s with { Risk = risk with { Thresholds = [.. risk.Thresholds] } });

        Assert.Equal((1L, Start.AddMinutes(5)), (updated!.SettingsVersion, updated.UpdatedAt));
        Assert.Equal(updated, again);
        Assert.Equal(risk, (await Backend.Sites.GetAsync(site.Id))!.Risk);
    }

    [Fact]
    public async Task ATakenIdIsRefusedAndTheFirstSiteStays()
    {
        var first = await CreateSiteAsync();

        Assert.False(await Backend.Sites.CreateAsync(first with { Name = "Another" }));
        Assert.Equal(first, await Backend.Sites.GetAsync(first.Id));
    }

    [Fact]
    public async Task AnUnknownSiteIsNull()
    {
        Assert.Null(await Backend.Sites.GetAsync("nowhere"));
        Assert.Null(await Backend.Sites.UpdateAsync("nowhere", s => s with { Name = "x" }));
        Assert.False(await Backend.Sites.DeleteAsync("nowhere"));
    }

    [Fact]
    public async Task SitesAreListedByIdInPages()
    {
        foreach (var id in new[] { "c-site", "a-site", "d-site", "b-site" })
        {
            await CreateSiteAsync(id);
        }

        var first = await Backend.Sites.ListAsync(null, 3);
        var rest = await Backend.Sites.ListAsync(first[^1].Id, 3);

        Assert.Equal(["a-site", "b-site", "c-site"], first.Select(s => s.Id));
        Assert.Equal(["d-site"], rest.Select(s => s.Id));
    }

    [Fact]
    public async Task ANameChangeKeepsTheSettingsVersionAndASettingsChangeRaisesIt()
    {
        var site = await CreateSiteAsync();
        Clock.Advance(TimeSpan.FromMinutes(5));

        var renamed = await Backend.Sites.UpdateAsync(site.Id, s => s with { Name = "Renamed" });
        Clock.Advance(TimeSpan.FromMinutes(5));
        var changed = await Backend.Sites.UpdateAsync(site.Id, s => s with { Model = s.Model with { MaxOrder = 12 } });

        Assert.Equal(("Renamed", 1L, Start.AddMinutes(5)), (renamed!.Name, renamed.SettingsVersion, renamed.UpdatedAt));
        Assert.Equal((12, 2L, Start.AddMinutes(10)), (changed!.Model.MaxOrder, changed.SettingsVersion, changed.UpdatedAt));
        Assert.Equal(changed, await Backend.Sites.GetAsync(site.Id));
        Assert.Equal(site.CreatedAt, changed.CreatedAt);
    }

    [Fact]
    public async Task AChangeThatReturnsNullOrTheSameSiteWritesNothing()
    {
        var site = await CreateSiteAsync();
        Clock.Advance(TimeSpan.FromHours(1));

        Assert.Equal(site, await Backend.Sites.UpdateAsync(site.Id, _ => null));
        Assert.Equal(site, await Backend.Sites.UpdateAsync(site.Id, s => s));
        Assert.Equal(site, await Backend.Sites.GetAsync(site.Id));
    }

    [Fact]
    public async Task AChangeCannotMoveTheIdOrTheCreationTime()
    {
        var site = await CreateSiteAsync();

        var updated = await Backend.Sites.UpdateAsync(site.Id, s => s with { Id = "other", CreatedAt = Start.AddYears(-1), TimeZone = "UTC" });

        Assert.Equal((site.Id, site.CreatedAt, "UTC"), (updated!.Id, updated.CreatedAt, updated.TimeZone));
        Assert.Null(await Backend.Sites.GetAsync("other"));
    }

    [Fact]
    public async Task DeletingASiteRemovesItsReadingsModelAndArchive()
    {
        var site = await CreateSiteAsync();
        await Backend.Readings.IngestAsync(site.Id, Hourly(Start, 1, 2, 3), Readings.ConflictPolicy.Reject, Start);
        Assert.True(await Backend.Models.SaveAsync(new Models.StoredModel(site.Id, site.Key, Start, 10, 1, Start, 3, 0.5, "{}")));
        Assert.True(await Backend.Archive.ArchiveAsync(new Verification.ArchivedForecast(site.Id, site.Key, new DateOnly(2026, 3, 2), Start, Start, Start, "{}")));

        Assert.True(await Backend.Sites.DeleteAsync(site.Id));

        Assert.Null(await Backend.Sites.GetAsync(site.Id));
        Assert.Null(await Backend.Readings.ReadAsync(site.Id, long.MinValue, long.MaxValue, null, 10));
        Assert.Null(await Backend.Models.GetAsync(site.Id));
        Assert.False(await Backend.Archive.HasArchivedAsync(site.Id, new DateOnly(2026, 3, 2)));

        // A new site under the same id starts empty, has another key, and refuses the old site's writes.
        var renewed = await CreateSiteAsync(site.Id);
        Assert.NotEqual(site.Key, renewed.Key);
        Assert.Empty((await Backend.Readings.ReadAsync(site.Id, long.MinValue, long.MaxValue, null, 10))!);
        Assert.Null(await Backend.Models.GetAsync(site.Id));
        Assert.False(await Backend.Models.SaveAsync(new Models.StoredModel(site.Id, site.Key, Start, 10, 1, Start, 3, 0.5, "{}")));
        Assert.Null(await Backend.Models.GetAsync(site.Id));
    }
}
