using System.Net;
using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;
using ForecastHub.Api.Verification;
using ForecastHub.Api.Models;
using ForecastHub.TestData;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Verification;

/// <summary>GET .../verification through the real pipeline: the rolling-origin backtest, and live
/// scores of the archived day-ahead forecast once its day has been observed (fake clock).</summary>
public sealed class VerificationTests
{
    [Fact]
    public async Task UnknownSiteIsNotFoundAndSiteWithoutModelIsAConflict()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("bare");

        var missing = await client.GetJsonAsync("/api/v1/sites/nowhere/verification", HttpStatusCode.NotFound);
        var conflict = await client.GetJsonAsync("/api/v1/sites/bare/verification", HttpStatusCode.Conflict);

        Assert.Equal(404, missing.GetProperty("status").GetInt32());
        Assert.Contains("no fitted model", conflict.GetProperty("detail").GetString(), StringComparison.Ordinal);
    }

    [Fact]
    public async Task FittedSiteGetsADayAheadBacktestScoredPerHorizonAndCached()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("tested");
        await factory.IngestAsync("tested", ModelScenario.History(factory, days: 30));
        await client.RefitAsync("tested");

        var first = await client.GetJsonAsync("/api/v1/sites/tested/verification");
        var again = await client.GetJsonAsync("/api/v1/sites/tested/verification");

        var backtest = first.GetProperty("backtest");
        var origins = backtest.GetProperty("origins").GetInt32();
        Assert.InRange(origins, 20, 30);
        Assert.Equal(VerificationService.HourlyRefitEveryDays, backtest.GetProperty("refitEveryDays").GetInt32());
        var horizons = backtest.GetProperty("horizons").EnumerateArray().ToList();
        Assert.Equal(Enumerable.Range(1, 24), horizons.Select(h => h.GetProperty("horizon").GetInt32()));
        Assert.All(horizons, h => Assert.InRange(h.GetProperty("count").GetInt32(), 1, origins));
        var pooled = backtest.GetProperty("pooled");
        Assert.Equal(horizons.Sum(h => h.GetProperty("count").GetInt32()), pooled.GetProperty("count").GetInt32());
        // AR(1) anomalies with innovation sd 0.6 and phi 0.9: a day-ahead error sd of about 1.4 C.
        Assert.InRange(pooled.GetProperty("mae").GetDouble(), 0.3, 3);
        Assert.True(pooled.GetProperty("rmse").GetDouble() >= pooled.GetProperty("mae").GetDouble());
        Assert.True(double.IsFinite(pooled.GetProperty("skillVsPersistence").GetDouble()));
        var levels = pooled.GetProperty("intervals").EnumerateArray().ToList();
        Assert.Equal([80.0, 95.0], levels.Select(l => l.GetProperty("level").GetDouble()));
        Assert.All(levels, l => Assert.InRange(l.GetProperty("coverage").GetDouble(), 0, 1));
        Assert.True(levels[1].GetProperty("meanWidth").GetDouble() > levels[0].GetProperty("meanWidth").GetDouble());
        Assert.Equal(0, first.GetProperty("live").GetProperty("days").GetInt32());
        Assert.Equal(backtest.GetRawText(), again.GetProperty("backtest").GetRawText());
    }

    [Fact]
    public async Task HourlyBacktestCoversTheWholeHistoryUpToAYearWithAtMostTwelveRefits()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("season");
        await factory.IngestAsync("season", ModelScenario.History(factory, days: 150));
        await client.RefitAsync("season");

        var backtest = (await client.GetJsonAsync("/api/v1/sites/season/verification")).GetProperty("backtest");

        // 150 days of data: origins over all of them but the first fit's minimum (well past the old 60 days),
        // refits every ceil(150 / 12) = 13 days, so at most 12 fits.
        Assert.Equal(13, backtest.GetProperty("refitEveryDays").GetInt32());
        Assert.InRange(backtest.GetProperty("origins").GetInt32(), 100, 150);
        var span = backtest.GetProperty("to").GetDateTimeOffset() - backtest.GetProperty("from").GetDateTimeOffset();
        Assert.InRange(span.TotalDays, 100, 151);
    }

    [Fact]
    public async Task DayAheadForecastIsArchivedOnceAndScoredAgainstItsObservedDay()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("live");
        var issuedAt = factory.Clock.GetUtcNow();
        // One continuous series: 20 days up to now, then the two days that follow.
        var series = SyntheticSeries.Hourly(issuedAt.AddDays(-20), (22 * 24) - 1, seed: 11);
        var (past, future) = (series.Where(r => r.Time < issuedAt).ToList(), series.Where(r => r.Time >= issuedAt).ToList());
        await factory.IngestAsync("live", past);
        await client.RefitAsync("live");
        var archiveStep = factory.Services.GetServices<ISweepStep>().OfType<DayAheadArchiveStep>().Single();

        // Tomorrow in Berlin (UTC+2 in June) runs 2025-06-01T22:00Z to 2025-06-02T22:00Z.
        var dayStart = new DateTimeOffset(2025, 6, 1, 22, 0, 0, TimeSpan.Zero);
        var forecast = await client.GetJsonAsync("/api/v1/sites/live/forecast?steps=48");
        var means = forecast.GetProperty("steps").EnumerateArray()
            .Select(s => (Time: s.GetProperty("time").GetDateTimeOffset(), Mean: s.GetProperty("mean").GetDouble()))
            .Where(s => s.Time >= dayStart && s.Time < dayStart.AddDays(1))
            .ToDictionary(s => s.Time, s => s.Mean);
        Assert.Equal(24, means.Count);
        await archiveStep.RunAsync(await SiteAsync(factory, "live"), CancellationToken.None);
        factory.Clock.Advance(TimeSpan.FromHours(2));
        await archiveStep.RunAsync(await SiteAsync(factory, "live"), CancellationToken.None);
        Assert.Equal(0, (await client.GetJsonAsync("/api/v1/sites/live/verification")).GetProperty("live").GetProperty("days").GetInt32());

        factory.Clock.Advance(TimeSpan.FromHours(34)); // 2025-06-03T00:00Z, after the local day ended
        await factory.IngestAsync("live", future.Where(r => r.Time < factory.Clock.GetUtcNow()));
        await archiveStep.RunAsync(await SiteAsync(factory, "live"), CancellationToken.None);
        var live = (await client.GetJsonAsync("/api/v1/sites/live/verification")).GetProperty("live");

        Assert.Equal(1, live.GetProperty("days").GetInt32());
        var day = Assert.Single(live.GetProperty("daily").EnumerateArray());
        Assert.Equal("2025-06-02", day.GetProperty("date").GetString());
        Assert.Equal(issuedAt, day.GetProperty("issuedAt").GetDateTimeOffset());
        Assert.Equal(24, day.GetProperty("points").GetInt32());
        // The scores are recomputed here from the forecast issued then and the readings of the day.
        var observed = future.Where(r => means.ContainsKey(r.Time)).ToList();
        var errors = observed.Select(r => means[r.Time] - r.ValueC).ToList();
        Assert.Equal(errors.Average(e => Math.Abs(e)), day.GetProperty("mae").GetDouble(), 9);
        Assert.Equal(errors.Average(), day.GetProperty("bias").GetDouble(), 9);
        var pooled = live.GetProperty("pooled");
        Assert.Equal(24, pooled.GetProperty("count").GetInt32());
        Assert.Equal(Math.Sqrt(errors.Average(e => e * e)), pooled.GetProperty("rmse").GetDouble(), 9);
    }

    private static async Task<Storage.Sites.SiteRecord> SiteAsync(ApiFactory factory, string id) =>
        (await factory.Services.GetRequiredService<Storage.Sites.ISiteStore>().GetAsync(id, CancellationToken.None))!;
}
