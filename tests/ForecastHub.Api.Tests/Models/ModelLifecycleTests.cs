using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.TestData;

namespace ForecastHub.Api.Tests.Models;

/// <summary>Refit triggers, failing fits, restarts and missing recent data, through the real pipeline.</summary>
public sealed class ModelLifecycleTests
{
    [Fact]
    public async Task RestartedServiceAnswersTheSameForecastFromTheStoredModel()
    {
        var path = TestFiles.NewDatabasePath();
        string before;
        DateTimeOffset fittedAt;
        await using (var first = new ApiFactory { DatabasePath = path, KeepDatabase = true })
        {
            using var client = first.CreateAdminClient();
            await client.CreateHourlySiteAsync("keeper");
            await first.IngestAsync("keeper", ModelScenario.History(first, days: 10));
            fittedAt = (await client.RefitAsync("keeper")).GetProperty("fittedAt").GetDateTimeOffset();
            before = (await client.GetJsonAsync("/api/v1/sites/keeper/forecast?below=0,5")).GetRawText();
        }

        await using var second = new ApiFactory { DatabasePath = path };
        using var again = second.CreateAdminClient();
        var model = await again.GetJsonAsync("/api/v1/sites/keeper/model");
        var after = (await again.GetJsonAsync("/api/v1/sites/keeper/forecast?below=0,5")).GetRawText();

        Assert.Equal(fittedAt, model.GetProperty("fittedAt").GetDateTimeOffset());
        Assert.Equal(before, after);
    }

    [Fact]
    public async Task SiteWhoseLastSixHoursAreMissingStillGetsAForecastWithWiderIntervals()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        var now = factory.Clock.GetUtcNow();
        // Readings on the hour up to and including the current hour.
        var series = SyntheticSeries.HourlyUntil(now.AddHours(1), 10 * 24, seed: 5);
        await client.CreateHourlySiteAsync("complete");
        await client.CreateHourlySiteAsync("gappy");
        await factory.IngestAsync("complete", series);
        await factory.IngestAsync("gappy", series.Where(r => r.Time <= now.AddHours(-6)));
        await client.RefitAsync("complete");
        await client.RefitAsync("gappy");

        var full = await client.GetJsonAsync("/api/v1/sites/complete/forecast");
        var gap = await client.GetJsonAsync("/api/v1/sites/gappy/forecast");

        Assert.Equal(JsonValueKind.Null, full.GetProperty("missingRecentData").ValueKind);
        var missing = gap.GetProperty("missingRecentData");
        Assert.Equal(6, missing.GetProperty("missingSteps").GetInt32());
        Assert.Contains("wider", missing.GetProperty("message").GetString(), StringComparison.Ordinal);
        Assert.Equal(now.AddHours(-6), gap.GetProperty("origin").GetDateTimeOffset());
        var fullSteps = full.GetProperty("steps");
        var gapSteps = gap.GetProperty("steps");
        Assert.Equal(48, gapSteps.GetArrayLength());
        Assert.Equal(fullSteps[0].GetProperty("time").GetDateTimeOffset(), gapSteps[0].GetProperty("time").GetDateTimeOffset());
        Assert.True(gapSteps[0].GetProperty("sd").GetDouble() > 1.3 * fullSteps[0].GetProperty("sd").GetDouble(),
            $"sd with the gap {gapSteps[0].GetProperty("sd")} vs without {fullSteps[0].GetProperty("sd")}");
        Assert.NotEmpty(gap.GetProperty("cautions").EnumerateArray());
    }

    [Fact]
    public async Task SettingsChangeTriggersARefitWithTheNewSettings()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("tuned");
        await factory.IngestAsync("tuned", ModelScenario.History(factory, days: 10));
        var first = await client.RefitAsync("tuned");
        Assert.Equal(48, first.GetProperty("settings").GetProperty("maxOrder").GetInt32());
        factory.Clock.Advance(TimeSpan.FromMinutes(5));

        var outcome = await factory.NextFitAsync("tuned", async () =>
        {
            using var patch = await client.PatchAsJsonAsync(new Uri("/api/v1/sites/tuned", UriKind.Relative), new { model = new { maxOrder = 2 } });
            Assert.Equal(HttpStatusCode.OK, patch.StatusCode);
        });

        Assert.True(outcome.Succeeded, outcome.Error);
        var model = await client.GetJsonAsync("/api/v1/sites/tuned/model");
        Assert.Equal(2, model.GetProperty("settings").GetProperty("maxOrder").GetInt32());
        Assert.True(model.GetProperty("ar").GetProperty("order").GetInt32() <= 2);
        Assert.Equal(factory.Clock.GetUtcNow(), model.GetProperty("fittedAt").GetDateTimeOffset());
    }

    [Fact]
    public async Task ARefitAfterADayOfNewReadingsKeepsTheCalibrationTableAndASettingsChangeRebuildsIt()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("carrier");
        var history = ModelScenario.History(factory, days: 40);
        var lastDay = history[^24].Time;
        await factory.IngestAsync("carrier", history.Where(r => r.Time < lastDay));
        var first = await client.RefitAsync("carrier");
        // A background fit of the same readings may have built the table first: either way it rests on this window.
        var builtThrough = first.GetProperty("window").GetProperty("to").GetDateTimeOffset();

        await factory.IngestAsync("carrier", history.Where(r => r.Time >= lastDay));
        var second = await client.RefitAsync("carrier");

        Assert.Equal(builtThrough.AddHours(24), second.GetProperty("window").GetProperty("to").GetDateTimeOffset());
        Assert.Equal(first.GetProperty("intervals").GetRawText(), second.GetProperty("intervals").GetRawText());
        Assert.Contains(Notes(second), n => n.StartsWith($"Interval calibration carried from the fit of the window ending {builtThrough:O} (", StringComparison.Ordinal));

        var third = await factory.NextFitAsync("carrier", async () =>
        {
            using var patch = await client.PatchAsJsonAsync(new Uri("/api/v1/sites/carrier", UriKind.Relative), new { model = new { maxOrder = 12 } });
            Assert.Equal(HttpStatusCode.OK, patch.StatusCode);
        });

        Assert.True(third.Succeeded, third.Error);
        var rebuilt = third.Model!.Model;
        Assert.Equal(12, rebuilt.Settings.MaxOrder);
        Assert.Equal(rebuilt.Window, rebuilt.Calibration!.BuiltOn);
        Assert.DoesNotContain(rebuilt.Notes, n => n.StartsWith("Interval calibration carried", StringComparison.Ordinal));
    }

    private static string[] Notes(JsonElement model) => [.. model.GetProperty("notes").EnumerateArray().Select(n => n.GetString()!)];

    [Fact]
    public async Task FailingFitKeepsTheOldModelServingAndShowsInHealth()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        // A week-long window and a month-long flat-line limit: a week of one value is not flagged, and the fit cannot use it.
        await client.CreateHourlySiteAsync("frozen", model: new { fitWindowDays = 7 }, quality: new { flatlineHours = 744 });
        var start = factory.Clock.GetUtcNow();
        await factory.IngestAsync("frozen", SyntheticSeries.HourlyUntil(start, 10 * 24, seed: 6));
        var good = await client.RefitAsync("frozen");
        var goodFittedAt = good.GetProperty("fittedAt").GetDateTimeOffset();
        factory.Clock.Advance(TimeSpan.FromDays(8));
        await factory.IngestAsync("frozen", Enumerable.Range(0, 8 * 24).Select(h => (start.AddHours(h), 3.5)));

        using var refit = await client.PostAsync(new Uri("/api/v1/sites/frozen/model/refit", UriKind.Relative), null);

        Assert.Equal(HttpStatusCode.UnprocessableEntity, refit.StatusCode);
        var problem = await refit.Content.ReadFromJsonAsync<JsonElement>();
        Assert.Contains("previous model keeps serving", problem.GetProperty("detail").GetString(), StringComparison.Ordinal);
        var model = await client.GetJsonAsync("/api/v1/sites/frozen/model");
        Assert.Equal(goodFittedAt, model.GetProperty("fittedAt").GetDateTimeOffset());
        Assert.True(model.GetProperty("lastAttempt").GetProperty("failed").GetBoolean());
        var health = await client.HealthAsync("frozen");
        Assert.Contains("fit-failed", ModelScenario.ReasonCodes(health));
        var forecast = await client.GetJsonAsync("/api/v1/sites/frozen/forecast");
        Assert.Equal(goodFittedAt, forecast.GetProperty("model").GetProperty("fittedAt").GetDateTimeOffset());
    }

    [Fact]
    public async Task MetricsCountReadingsFitsAndSitesByState()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("counted");
        await factory.IngestAsync("counted", ModelScenario.History(factory, days: 8));
        await client.RefitAsync("counted");
        await client.GetJsonAsync("/api/v1/sites/counted/forecast");

        using var response = await client.GetAsync(new Uri("/metrics", UriKind.Relative));
        var text = await response.Content.ReadAsStringAsync();

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.StartsWith("text/plain", response.Content.Headers.ContentType?.MediaType, StringComparison.Ordinal);
        Assert.Contains("forecasthub_readings_total{outcome=\"accepted\"} 192\n", text, StringComparison.Ordinal);
        Assert.Contains("forecasthub_fits_total{outcome=\"ok\"} ", text, StringComparison.Ordinal);
        Assert.Matches(@"(?m)^forecasthub_fit_duration_seconds_count(\{\})? [1-9][0-9]*$", text);
        Assert.Contains("forecasthub_forecast_duration_seconds_count{cache=\"miss\"} 1\n", text, StringComparison.Ordinal);
        Assert.Contains("forecasthub_sites{state=\"ok\"} 1\n", text, StringComparison.Ordinal);
        Assert.Contains("# TYPE forecasthub_fit_duration_seconds histogram\n", text, StringComparison.Ordinal);
    }
}
