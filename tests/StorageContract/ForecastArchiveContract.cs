using ForecastHub.Storage.Verification;

namespace ForecastHub.Storage.Contract;

/// <summary>What every <see cref="IForecastArchive"/> must do: the first forecast per day is kept, scores are replaced.</summary>
public abstract class ForecastArchiveContract : StorageContract
{
    private static readonly DateOnly Day = new(2026, 3, 2);

    private long siteKey;

    private ArchivedForecast Forecast(DateOnly day, int issuedHour, string json = """{"steps":[]}""") =>
        new("site-a", siteKey, day, Start.AddHours(issuedHour), Start.AddHours(issuedHour - 1), Start.AddHours(-3), json);

    [Fact]
    public async Task TheFirstForecastForADayIsKept()
    {
        siteKey = (await CreateSiteAsync()).Key;
        var first = Forecast(Day, 1);

        Assert.False(await Backend.Archive.HasArchivedAsync("site-a", Day));
        Assert.True(await Backend.Archive.ArchiveAsync(first));
        Assert.False(await Backend.Archive.ArchiveAsync(Forecast(Day, 2, """{"other":true}""")));

        Assert.True(await Backend.Archive.HasArchivedAsync("site-a", Day));
        Assert.Equal([first], await Backend.Archive.ListUnscoredAsync("site-a", 10));
    }

    [Fact]
    public async Task UnscoredForecastsAreListedOldestFirstUntilScored()
    {
        siteKey = (await CreateSiteAsync()).Key;
        var days = new[] { Day.AddDays(2), Day, Day.AddDays(1) };
        foreach (var day in days)
        {
            await Backend.Archive.ArchiveAsync(Forecast(day, 1));
        }

        Assert.Equal([Day, Day.AddDays(1)], (await Backend.Archive.ListUnscoredAsync("site-a", 2)).Select(f => f.TargetDate));

        Assert.True(await Backend.Archive.SaveScoreAsync(new LiveScore("site-a", siteKey, Day, Start.AddDays(2), """{"mae":1}""")));
        Assert.Equal([Day.AddDays(1), Day.AddDays(2)], (await Backend.Archive.ListUnscoredAsync("site-a", 10)).Select(f => f.TargetDate));
    }

    [Fact]
    public async Task ASecondScoreForADayReplacesTheFirstAndScoresListNewestFirstFromADate()
    {
        siteKey = (await CreateSiteAsync()).Key;
        for (var d = 0; d < 4; d++)
        {
            await Backend.Archive.ArchiveAsync(Forecast(Day.AddDays(d), 1));
            await Backend.Archive.SaveScoreAsync(new LiveScore("site-a", siteKey, Day.AddDays(d), Start.AddDays(d + 2), $$"""{"mae":{{d}}}"""));
        }
        var rescored = new LiveScore("site-a", siteKey, Day.AddDays(2), Start.AddDays(9), """{"mae":9}""");

        Assert.True(await Backend.Archive.SaveScoreAsync(rescored));

        var scores = await Backend.Archive.ListScoresAsync("site-a", Day.AddDays(1), 2);
        Assert.Equal([Day.AddDays(3), Day.AddDays(2)], scores.Select(s => s.TargetDate));
        Assert.Equal(rescored, scores[1]);
        Assert.Equal(3, (await Backend.Archive.ListScoresAsync("site-a", Day.AddDays(1), 10)).Count);
    }

    [Fact]
    public async Task AnUnknownSiteArchivesNothing()
    {
        Assert.False(await Backend.Archive.ArchiveAsync(Forecast(Day, 1) with { SiteId = "nowhere" }));
        Assert.False(await Backend.Archive.HasArchivedAsync("nowhere", Day));
        Assert.Empty(await Backend.Archive.ListUnscoredAsync("nowhere", 10));
        Assert.Empty(await Backend.Archive.ListScoresAsync("nowhere", Day, 10));
    }
}
