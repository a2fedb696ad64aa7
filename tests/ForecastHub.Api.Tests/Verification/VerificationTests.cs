using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using System.Text.Json.Nodes;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;
using ForecastHub.Api.Verification;
using ForecastHub.Api.Models;
using ForecastHub.Storage.Verification;
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

    [Fact]
    public async Task LiveScoresVerifyEachSiteThresholdFromTheArchivedStepProbabilities()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        var (series, issuedAt) = await FittedLiveSiteAsync(factory, client);
        var dayStart = new DateTimeOffset(2025, 6, 1, 22, 0, 0, TimeSpan.Zero);
        var firstMeans = (await DayStepsAsync(client, dayStart)).Select(s => s.GetProperty("mean").GetDouble()).Order().ToList();
        // A threshold at the middle of the day's forecast, so both outcomes and a spread of probabilities occur.
        var valueC = Math.Round(firstMeans[firstMeans.Count / 2], 1);
        using var patched = await client.PatchAsJsonAsync("/api/v1/sites/live", new { thresholds = new[] { new { id = "warm", direction = "above", valueC } } });
        Assert.Equal(HttpStatusCode.OK, patched.StatusCode);
        var probabilities = (await DayStepsAsync(client, dayStart)).ToDictionary(
            s => s.GetProperty("time").GetDateTimeOffset(),
            s => Assert.Single(s.GetProperty("probabilities").EnumerateArray()).GetProperty("probability").GetDouble());
        var archiveStep = factory.Services.GetServices<ISweepStep>().OfType<DayAheadArchiveStep>().Single();
        await archiveStep.RunAsync(await SiteAsync(factory, "live"), CancellationToken.None);

        factory.Clock.Advance(TimeSpan.FromHours(36)); // after the local day 2025-06-02 ended
        await factory.IngestAsync("live", series.Where(r => r.Time >= issuedAt && r.Time < factory.Clock.GetUtcNow()));
        await archiveStep.RunAsync(await SiteAsync(factory, "live"), CancellationToken.None);
        var live = (await client.GetJsonAsync("/api/v1/sites/live/verification")).GetProperty("live");

        // Hand-computed: Brier score BS = (1/N) sum (p_i - o_i)^2 (Brier 1950, Monthly Weather Review 78(1), 1-3); the reference
        // is the base rate b of the same month, BS_ref = (1/N) sum (b - o_i)^2 = b(1 - b); skill 1 - BS / BS_ref.
        var cases = series.Where(r => probabilities.ContainsKey(r.Time)).Select(r => (P: probabilities[r.Time], O: r.ValueC > valueC ? 1.0 : 0.0)).ToList();
        Assert.Equal(24, cases.Count);
        var brier = cases.Average(c => (c.P - c.O) * (c.P - c.O));
        var baseRate = cases.Average(c => c.O);
        Assert.InRange(baseRate, 0.01, 0.99);
        var threshold = Assert.Single(live.GetProperty("thresholds").EnumerateArray());
        Assert.Equal("warm", threshold.GetProperty("id").GetString());
        Assert.Equal(valueC, threshold.GetProperty("threshold").GetDouble());
        Assert.Equal("above", threshold.GetProperty("direction").GetString());
        Assert.Equal("step", threshold.GetProperty("window").GetString());
        Assert.Equal(24, threshold.GetProperty("count").GetInt32());
        Assert.Equal(baseRate, threshold.GetProperty("baseRate").GetDouble(), 9);
        Assert.Equal(brier, threshold.GetProperty("brier").GetDouble(), 9);
        Assert.Equal(baseRate * (1 - baseRate), threshold.GetProperty("climatologyBrier").GetDouble(), 9);
        Assert.Equal(1 - (brier / (baseRate * (1 - baseRate))), threshold.GetProperty("brierSkill").GetDouble(), 9);
        var bins = threshold.GetProperty("reliability").EnumerateArray().ToList();
        Assert.Equal(10, bins.Count);
        for (var b = 0; b < 10; b++)
        {
            // Bin b holds [b/10, (b+1)/10); p = 1 falls in the last.
            var inBin = cases.Where(c => Math.Min(9, (int)(c.P * 10)) == b).ToList();
            Assert.Equal(b / 10.0, bins[b].GetProperty("from").GetDouble(), 12);
            Assert.Equal(inBin.Count, bins[b].GetProperty("count").GetInt32());
            if (inBin.Count == 0)
            {
                Assert.Equal(JsonValueKind.Null, bins[b].GetProperty("forecastMean").ValueKind);
                continue;
            }

            Assert.Equal(inBin.Average(c => c.P), bins[b].GetProperty("forecastMean").GetDouble(), 9);
            Assert.Equal(inBin.Average(c => c.O), bins[b].GetProperty("observedFrequency").GetDouble(), 9);
        }
    }

    [Fact]
    public async Task DayArchivedWithoutStepProbabilitiesIsStillScoredWithoutThresholdScores()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        var (series, issuedAt) = await FittedLiveSiteAsync(factory, client);
        using var patched = await client.PatchAsJsonAsync("/api/v1/sites/live", new { thresholds = new[] { new { id = "warm", direction = "above", valueC = 15.0 } } });
        Assert.Equal(HttpStatusCode.OK, patched.StatusCode);
        var dayStart = new DateTimeOffset(2025, 6, 1, 22, 0, 0, TimeSpan.Zero);
        // The day as the previous build archived it: format 2, steps without probabilities.
        var steps = (await DayStepsAsync(client, dayStart)).Select(s => new JsonObject
        {
            ["time"] = s.GetProperty("time").GetString(),
            ["mean"] = s.GetProperty("mean").GetDouble(),
            ["sd"] = s.GetProperty("sd").GetDouble(),
            ["lower"] = new JsonArray([.. s.GetProperty("intervals").EnumerateArray().Select(i => (JsonNode)i.GetProperty("lower").GetDouble())]),
            ["upper"] = new JsonArray([.. s.GetProperty("intervals").EnumerateArray().Select(i => (JsonNode)i.GetProperty("upper").GetDouble())]),
        }).ToList();
        var means = steps.ToDictionary(s => DateTimeOffset.Parse(s["time"]!.GetValue<string>(), System.Globalization.CultureInfo.InvariantCulture), s => s["mean"]!.GetValue<double>());
        var json = new JsonObject { ["format"] = 2, ["day"] = new JsonObject { ["levels"] = new JsonArray(0.8, 0.95), ["steps"] = new JsonArray([.. steps]) } }.ToJsonString();
        var site = await SiteAsync(factory, "live");
        var archive = factory.Services.GetRequiredService<IForecastArchive>();
        Assert.True(await archive.ArchiveAsync(new ArchivedForecast("live", site.Key, new DateOnly(2025, 6, 2), issuedAt, issuedAt.AddHours(-1), issuedAt, json), CancellationToken.None));

        factory.Clock.Advance(TimeSpan.FromHours(36));
        await factory.IngestAsync("live", series.Where(r => r.Time >= issuedAt && r.Time < factory.Clock.GetUtcNow()));
        var archiveStep = factory.Services.GetServices<ISweepStep>().OfType<DayAheadArchiveStep>().Single();
        await archiveStep.RunAsync(await SiteAsync(factory, "live"), CancellationToken.None);
        var live = (await client.GetJsonAsync("/api/v1/sites/live/verification")).GetProperty("live");

        Assert.Equal(1, live.GetProperty("days").GetInt32());
        var day = Assert.Single(live.GetProperty("daily").EnumerateArray());
        Assert.Equal(24, day.GetProperty("points").GetInt32());
        var errors = series.Where(r => means.ContainsKey(r.Time)).Select(r => means[r.Time] - r.ValueC).ToList();
        Assert.Equal(errors.Average(e => Math.Abs(e)), day.GetProperty("mae").GetDouble(), 9);
        Assert.Empty(live.GetProperty("thresholds").EnumerateArray());
    }

    // An hourly site in Berlin with 20 days of one continuous series up to now, fitted; the series runs two days further.
    private static async Task<(IReadOnlyList<(DateTimeOffset Time, double ValueC)> Series, DateTimeOffset IssuedAt)> FittedLiveSiteAsync(ApiFactory factory, HttpClient client)
    {
        await client.CreateHourlySiteAsync("live");
        var issuedAt = factory.Clock.GetUtcNow();
        var series = SyntheticSeries.Hourly(issuedAt.AddDays(-20), (22 * 24) - 1, seed: 11);
        await factory.IngestAsync("live", series.Where(r => r.Time < issuedAt).ToList());
        await client.RefitAsync("live");
        return (series, issuedAt);
    }

    // The forecast endpoint's steps that fall on the local day starting at dayStart.
    private static async Task<List<JsonElement>> DayStepsAsync(HttpClient client, DateTimeOffset dayStart) =>
        [.. (await client.GetJsonAsync("/api/v1/sites/live/forecast?steps=48")).GetProperty("steps").EnumerateArray()
            .Where(s => s.GetProperty("time").GetDateTimeOffset() >= dayStart && s.GetProperty("time").GetDateTimeOffset() < dayStart.AddDays(1))];

    private static async Task<Storage.Sites.SiteRecord> SiteAsync(ApiFactory factory, string id) =>
        (await factory.Services.GetRequiredService<Storage.Sites.ISiteStore>().GetAsync(id, CancellationToken.None))!;
}
