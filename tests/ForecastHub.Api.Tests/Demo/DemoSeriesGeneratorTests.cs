using ForecastHub.Api.Demo;

namespace ForecastHub.Api.Tests.Demo;

public sealed class DemoSeriesGeneratorTests
{
    private static readonly DateTimeOffset Now = new(2025, 3, 10, 9, 27, 0, TimeSpan.Zero);

    private static DemoSeries Site(IReadOnlyList<DemoSeries> all, string id) => all.Single(s => s.Site.Id == id);

    [Fact]
    public void SameSeedAndClockGiveTheSameReadings()
    {
        var first = DemoSeriesGenerator.Generate(Now, seed: 7);
        var second = DemoSeriesGenerator.Generate(Now, seed: 7);
        var other = DemoSeriesGenerator.Generate(Now, seed: 8);

        Assert.Equal(first.SelectMany(s => s.Readings), second.SelectMany(s => s.Readings));
        Assert.NotEqual(first[0].Readings.Select(r => r.ValueC), other[0].Readings.Select(r => r.ValueC));
    }

    [Fact]
    public void HealthyLoggerHasFourHundredDaysOfHourlyReadingsEndingAtTheLastHour()
    {
        var low = Site(DemoSeriesGenerator.Generate(Now), "ambrel-low").Readings;

        Assert.Equal(DemoScenario.HistoryDays * 24, low.Count);
        Assert.All(low.Zip(low.Skip(1)), pair => Assert.Equal(1.0, (pair.Second.Time - pair.First.Time).TotalHours, 0.02));
        Assert.True(low[^1].Time <= Now);
        Assert.True(Now - low[^1].Time < TimeSpan.FromHours(1));
    }

    [Fact]
    public void NoReadingLiesAfterTheClockEvenWhenItStandsJustPastTheHour()
    {
        var justPast = new DateTimeOffset(2025, 3, 10, 9, 0, 1, TimeSpan.Zero);

        var all = DemoSeriesGenerator.Generate(justPast);

        Assert.All(all, s => Assert.True(s.Readings[^1].Time <= justPast));
    }

    [Fact]
    public void ReadingsCarryTheFarmsLocalOffset()
    {
        var low = Site(DemoSeriesGenerator.Generate(new DateTimeOffset(2025, 7, 1, 12, 0, 0, TimeSpan.Zero)), "ambrel-low");

        Assert.Equal(TimeSpan.FromHours(1), low.Readings[^1].Time.Offset);
        Assert.Contains(low.Readings, r => r.Time.Offset == TimeSpan.Zero);
    }

    [Fact]
    public void FrostNightSendsTheValleyFloorWellBelowZeroAndTheRidgeLeast()
    {
        var all = DemoSeriesGenerator.Generate(Now);

        double FrostNightMinimum(string id) => Site(all, id).Readings
            .Where(r => r.Time >= new DateTimeOffset(2024, 4, 20, 18, 0, 0, TimeSpan.FromHours(1))
                && r.Time < new DateTimeOffset(2024, 4, 21, 10, 0, 0, TimeSpan.FromHours(1)))
            .Min(r => r.ValueC);

        Assert.InRange(FrostNightMinimum("ambrel-low"), -5.0, -3.5);
        Assert.True(FrostNightMinimum("ambrel-low") < FrostNightMinimum("ambrel-mid"));
        Assert.True(FrostNightMinimum("ambrel-mid") < FrostNightMinimum("ambrel-top"));
        Assert.True(FrostNightMinimum("ambrel-top") < 0);
    }

    [Fact]
    public void MiddleTerraceHasOneOutageOfMoreThanFiveDays()
    {
        var mid = Site(DemoSeriesGenerator.Generate(Now), "ambrel-mid").Readings;

        var longGaps = mid.Zip(mid.Skip(1)).Select(p => p.Second.Time - p.First.Time).Where(d => d > TimeSpan.FromHours(2)).ToList();

        var gap = Assert.Single(longGaps);
        Assert.True(gap > TimeSpan.FromDays(5));
    }

    [Fact]
    public void MiddleTerraceHasOneSpikeThatJumpsAwayFromBothNeighbours()
    {
        var mid = Site(DemoSeriesGenerator.Generate(Now), "ambrel-mid").Readings;

        var spikes = Enumerable.Range(1, mid.Count - 2)
            .Where(i => mid[i].ValueC - mid[i - 1].ValueC > 10 && mid[i].ValueC - mid[i + 1].ValueC > 10)
            .ToList();

        Assert.Single(spikes);
    }

    [Fact]
    public void RidgeLoggerIsSilentForItsNewestNineHours()
    {
        var top = Site(DemoSeriesGenerator.Generate(Now), "ambrel-top").Readings;

        Assert.InRange(Now - top[^1].Time, TimeSpan.FromHours(9), TimeSpan.FromHours(10));
    }

    [Fact]
    public void ColdStoreNewestReadingsRepeatOneValue()
    {
        var store = Site(DemoSeriesGenerator.Generate(Now), "ambrel-store").Readings;

        var newest = store.TakeLast(14).Select(r => r.ValueC).Distinct();

        Assert.Single(newest);
        Assert.NotEqual(store[^15].ValueC, store[^14].ValueC);
        Assert.InRange(store.Average(r => r.ValueC), 0.5, 2.5);
    }

    [Fact]
    public void NothingButTheStuckSensorRepeatsAValueSixTimesRunning()
    {
        var all = DemoSeriesGenerator.Generate(Now);

        foreach (var series in all)
        {
            var values = series.Readings.Select(r => r.ValueC).ToList();
            var longest = LongestRun(series.Site.Faults.StuckLastHours > 0 ? values.SkipLast(14).ToList() : values);
            Assert.True(longest < 6, $"{series.Site.Id} repeats a value {longest} times");
        }
    }

    [Fact]
    public void NewTunnelLoggerHasOnlyFourDaysOfHistory()
    {
        var tunnel = Site(DemoSeriesGenerator.Generate(Now), "ambrel-tunnel").Readings;

        Assert.Equal(4 * 24, tunnel.Count);
    }

    [Fact]
    public void OrchardShowsAnnualAndDailyCycles()
    {
        var low = Site(DemoSeriesGenerator.Generate(Now), "ambrel-low").Readings;

        var january = low.Where(r => r.Time.Month == 1).Average(r => r.ValueC);
        var july = low.Where(r => r.Time.Month == 7).Average(r => r.ValueC);
        var afternoon = low.Where(r => r.Time.Hour == 15).Average(r => r.ValueC);
        var dawn = low.Where(r => r.Time.Hour == 5).Average(r => r.ValueC);

        Assert.InRange(july - january, 10, 16);
        Assert.InRange(afternoon - dawn, 6, 14);
    }

    [Fact]
    public void OrchardAnomalyIsStronglyAutocorrelatedFromHourToHour()
    {
        var low = Site(DemoSeriesGenerator.Generate(Now), "ambrel-low").Readings;

        // Day-to-day differences at the same hour remove both cycles and leave the weather.
        var sameHour = low.Where(r => r.Time.Hour == 3).Select(r => r.ValueC).ToArray();
        var nextHour = low.Where(r => r.Time.Hour == 4).Select(r => r.ValueC).ToArray();
        var anomaly3 = sameHour.Select(v => v - sameHour.Average()).ToArray();
        var anomaly4 = nextHour.Select(v => v - nextHour.Average()).ToArray();
        var n = Math.Min(anomaly3.Length, anomaly4.Length);
        var correlation = Enumerable.Range(0, n).Sum(i => anomaly3[i] * anomaly4[i])
            / Math.Sqrt(anomaly3.Take(n).Sum(a => a * a) * anomaly4.Take(n).Sum(a => a * a));

        Assert.True(correlation > 0.9, $"hour-to-hour correlation {correlation:F3}");
    }

    private static int LongestRun(IReadOnlyList<double> values)
    {
        int longest = 1, run = 1;
        for (var i = 1; i < values.Count; i++)
        {
            run = values[i] == values[i - 1] ? run + 1 : 1;
            longest = Math.Max(longest, run);
        }
        return longest;
    }
}
