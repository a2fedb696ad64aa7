using ForecastHub.Storage.Models;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Storage.Contract;

/// <summary>What every <see cref="IModelStore"/> must do: one serving model and one last attempt per site.</summary>
public abstract class ModelStoreContract : StorageContract
{
    private static StoredModel Model(SiteRecord site, int hours, string json = """{"order":3}""") =>
        new(site.Id, site.Key, Start.AddHours(hours), 12.5, 1 + hours, Start.AddHours(hours - 1), 100 + hours, hours == 0 ? null : 0.25, json);

    [Fact]
    public async Task ASiteWithoutAModelHasNone()
    {
        await CreateSiteAsync();

        Assert.Null(await Backend.Models.GetAsync("site-a"));
        Assert.Null(await Backend.Models.GetSummaryAsync("site-a"));
        Assert.Null(await Backend.Models.GetLastAttemptAsync("site-a"));
        Assert.Empty(await Backend.Models.ListSummariesAsync());
    }

    [Fact]
    public async Task ASavedModelReadsBackEqualAndTheNextReplacesIt()
    {
        var site = await CreateSiteAsync();
        var first = Model(site, 0);
        var second = Model(site, 5, """{"order":4,"text":"\u00e9\n"}""");

        Assert.True(await Backend.Models.SaveAsync(first));
        Assert.Equal(first, await Backend.Models.GetAsync("site-a"));
        Assert.True(await Backend.Models.SaveAsync(second));

        Assert.Equal(second, await Backend.Models.GetAsync("site-a"));
        Assert.Equal(new FitAttempt("site-a", site.Key, second.FittedAt, false, null), await Backend.Models.GetLastAttemptAsync("site-a"));
    }

    [Fact]
    public async Task SummariesCarryTheBookkeepingOfEverySitesModel()
    {
        var siteA = await CreateSiteAsync("site-a");
        var siteB = await CreateSiteAsync("site-b");
        await CreateSiteAsync("site-c");
        var a = Model(siteA, 2);
        var b = Model(siteB, 3);
        await Backend.Models.SaveAsync(a);
        await Backend.Models.SaveAsync(b);

        var expected = new[] { a, b }.Select(m => new ModelSummary(m.SiteId, m.FittedAt, m.SettingsVersion, m.DataEnd, m.DataPoints, m.ResidualPValue));
        Assert.Equal(expected, (await Backend.Models.ListSummariesAsync()).OrderBy(s => s.SiteId, StringComparer.Ordinal));
        Assert.Equal(expected.First(), await Backend.Models.GetSummaryAsync("site-a"));
        Assert.Null(await Backend.Models.GetSummaryAsync("site-c"));
    }

    [Fact]
    public async Task AFailedAttemptIsRecordedAndTheServingModelStays()
    {
        var site = await CreateSiteAsync();
        var model = Model(site, 1);
        await Backend.Models.SaveAsync(model);
        var failure = new FitAttempt("site-a", site.Key, Start.AddHours(9), true, "SeriesException: constant series");

        Assert.True(await Backend.Models.RecordFailureAsync(failure));

        Assert.Equal(failure, await Backend.Models.GetLastAttemptAsync("site-a"));
        Assert.Equal(model, await Backend.Models.GetAsync("site-a"));

        // A later successful fit is the last attempt again.
        var next = Model(site, 12);
        await Backend.Models.SaveAsync(next);
        Assert.Equal(new FitAttempt("site-a", site.Key, next.FittedAt, false, null), await Backend.Models.GetLastAttemptAsync("site-a"));
    }

    [Fact]
    public async Task AnUnknownSiteStoresNothing()
    {
        Assert.False(await Backend.Models.SaveAsync(Model(Site("nowhere") with { Key = 1 }, 1)));
        Assert.False(await Backend.Models.RecordFailureAsync(new FitAttempt("nowhere", 1, Start, true, "x")));
        Assert.Null(await Backend.Models.GetAsync("nowhere"));
        Assert.Empty(await Backend.Models.ListSummariesAsync());
    }
}
