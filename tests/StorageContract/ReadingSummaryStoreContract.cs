using ForecastHub.Core.Grid;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Readings;

namespace ForecastHub.Storage.Contract;

/// <summary>What every <see cref="IReadingSummaryStore"/> must do: the newest reading and counts, without reading the history.</summary>
public abstract class ReadingSummaryStoreContract : StorageContract
{
    private const long HourMs = 3_600_000;
    private const long DayMs = 24 * HourMs;

    [Fact]
    public async Task AnUnknownSiteHasNoSummaryAndASiteWithoutReadingsAnEmptyOne()
    {
        await CreateSiteAsync();

        Assert.Null(await Backend.Summaries.GetAsync("nowhere"));
        Assert.Equal(new ReadingSummary(null, 0, 0, 0), await Backend.Summaries.GetAsync("site-a"));
        Assert.Equal(new StepsWithData(0, null), await Backend.Summaries.CountStepsWithDataAsync("site-a", Start, HourMs, 0));
    }

    [Fact]
    public async Task TheSummaryCountsThe24HoursEndingAtTheNewestReading()
    {
        await CreateSiteAsync();
        // 30 hourly readings; the one 24 h before the newest lies outside (the window is (last - 24 h, last]).
        var values = Enumerable.Range(0, 30).Select(i => 10 + (i % 2) * 0.5).ToArray();
        values[20] = 61;
        await Backend.Readings.IngestAsync("site-a", Hourly(Start, values), ConflictPolicy.Reject, Start);

        var summary = await Backend.Summaries.GetAsync("site-a");

        Assert.Equal(Start.AddHours(29), summary!.LastObservationAt);
        Assert.Equal(0, summary.LastFlags);
        Assert.Equal(24, summary.LastDayReadings);
        Assert.True(summary.LastDayFlagged >= 1);
    }

    [Fact]
    public async Task TheNewestReadingsFlagsAreReported()
    {
        await CreateSiteAsync();
        await Backend.Readings.IngestAsync("site-a", Hourly(Start, 10, 10.5, 70), ConflictPolicy.Reject, Start);

        Assert.Equal((int)Core.Quality.QualityFlags.OutOfRange, (await Backend.Summaries.GetAsync("site-a"))!.LastFlags);
    }

    [Fact]
    public async Task StepsWithDataCountEachStepOnceAndOnlyForUnflaggedReadings()
    {
        await CreateSiteAsync();
        IncomingReading[] readings =
        [
            new(0, Ms(Start), 10, 10, "C"),
            new(1, Ms(Start.AddMinutes(20)), 10.2, 10.2, "C"),
            new(2, Ms(Start.AddMinutes(40)), 10.4, 10.4, "C"),
            new(3, Ms(Start.AddHours(1)), 75, 75, "C"),
            new(4, Ms(Start.AddHours(2).AddMinutes(30)), 10.6, 10.6, "C"),
            new(5, Ms(Start.AddHours(5)), 10.8, 10.8, "C"),
        ];
        await Backend.Readings.IngestAsync("site-a", readings, ConflictPolicy.Reject, Start);

        // Hours 0, 2 and 5 hold an unflagged reading; hour 1 holds only an out-of-range one.
        Assert.Equal(new StepsWithData(3, Start.AddHours(5)), await Backend.Summaries.CountStepsWithDataAsync("site-a", Start, HourMs, 0));
        Assert.Equal(new StepsWithData(2, Start.AddHours(5)), await Backend.Summaries.CountStepsWithDataAsync("site-a", Start.AddHours(1), HourMs, 0));
        Assert.Equal(new StepsWithData(0, null), await Backend.Summaries.CountStepsWithDataAsync("site-a", Start.AddHours(6), HourMs, 0));
    }

    [Fact]
    public async Task DailyStepsAreShiftedByTheZonesStandardOffset()
    {
        await CreateSiteAsync("daily-site", GridCadence.Daily);
        // 23:30 UTC is already the next local day at UTC+1.
        IncomingReading[] readings =
        [
            new(0, Ms(Start.AddHours(12)), 5, 5, "C"),
            new(1, Ms(Start.AddHours(23).AddMinutes(30)), 5.5, 5.5, "C"),
        ];
        await Backend.Readings.IngestAsync("daily-site", readings, ConflictPolicy.Reject, Start);

        Assert.Equal(1, (await Backend.Summaries.CountStepsWithDataAsync("daily-site", Start, DayMs, 0)).Count);
        Assert.Equal(2, (await Backend.Summaries.CountStepsWithDataAsync("daily-site", Start, DayMs, HourMs)).Count);
    }
}
