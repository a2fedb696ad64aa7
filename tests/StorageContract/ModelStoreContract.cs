using ForecastHub.Storage.Models;

namespace ForecastHub.Storage.Contract;

/// <summary>What every <see cref="IModelStore"/> must do: one serving model and one last attempt per site.</summary>
public abstract class ModelStoreContract : StorageContract
{
    private static StoredModel Model(string siteId, int hours, string json = """{"order":3}""") =>
        new(siteId, Start.AddHours(hours), 12.5, 1 + hours, Start.AddHours(hours - 1), 100 + hours, hours == 0 ? null : 0.25, json);

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
        await CreateSiteAsync();
        var first = Model("site-a", 0);
        var second = Model("site-a", 5, """{"order":4,"text":"\u00e9\n"}""");

        Assert.True(await Backend.Models.SaveAsync(first));
        Assert.Equal(first, await Backend.Models.GetAsync("site-a"));
        Assert.True(await Backend.Models.SaveAsync(second));

        Assert.Equal(second, await Backend.Models.GetAsync("site-a"));
        Assert.Equal(new FitAttempt("site-a", second.FittedAt, false, null), await Backend.Models.GetLastAttemptAsync("site-a"));
    }

    [Fact]
    public async Task SummariesCarryTheBookkeepingOfEverySitesModel()
    {
        await CreateSiteAsync("site-a");
        await CreateSiteAsync("site-b");
        await CreateSiteAsync("site-c");
        var a = Model("site-a", 2);
        var b = Model("site-b", 3);
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
        await CreateSiteAsync();
        var model = Model("site-a", 1);
        await Backend.Models.SaveAsync(model);
        var failure = new FitAttempt("site-a", Start.AddHours(9), true, "SeriesException: constant series");

        Assert.True(await Backend.Models.RecordFailureAsync(failure));

        Assert.Equal(failure, await Backend.Models.GetLastAttemptAsync("site-a"));
        Assert.Equal(model, await Backend.Models.GetAsync("site-a"));

        // A later successful fit is the last attempt again.
        var next = Model("site-a", 12);
        await Backend.Models.SaveAsync(next);
        Assert.Equal(new FitAttempt("site-a", next.FittedAt, false, null), await Backend.Models.GetLastAttemptAsync("site-a"));
    }

    [Fact]
    public async Task AnUnknownSiteStoresNothing()
    {
        Assert.False(await Backend.Models.SaveAsync(Model("nowhere", 1)));
        Assert.False(await Backend.Models.RecordFailureAsync(new FitAttempt("nowhere", Start, true, "x")));
        Assert.Null(await Backend.Models.GetAsync("nowhere"));
        Assert.Empty(await Backend.Models.ListSummariesAsync());
    }
}
