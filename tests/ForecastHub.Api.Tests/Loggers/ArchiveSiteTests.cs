using System.Diagnostics;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;
using ForecastHub.TestData;

namespace ForecastHub.Api.Tests.Loggers;

/// <summary>A site holding only an archive that ended long before now: the fit window counts back from
/// the newest reading, the forecast is honest about its age, the backtest runs over the archive.</summary>
public sealed class ArchiveSiteTests
{
    [Fact]
    public async Task AnArchiveThatEndedAYearAgoIsFittedForecastStaleAndBacktested()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("archive-1");
        var archiveEnd = factory.Clock.GetUtcNow().AddDays(-365);
        await factory.IngestAsync("archive-1", SyntheticSeries.HourlyUntil(archiveEnd, 120 * 24, seed: 5));

        var model = await client.RefitAsync("archive-1");
        var watch = Stopwatch.StartNew();
        var forecast = await client.GetJsonAsync("/api/v1/sites/archive-1/forecast?steps=48");
        var forecastTime = watch.Elapsed;
        var health = await client.HealthAsync("archive-1");
        var verification = await client.GetJsonAsync("/api/v1/sites/archive-1/verification");

        var window = model.GetProperty("window");
        Assert.Equal(archiveEnd.AddHours(-1), window.GetProperty("to").GetDateTimeOffset());
        Assert.True(window.GetProperty("points").GetInt32() > 100 * 24);
        Assert.Contains(model.GetProperty("notes").EnumerateArray(), n => n.GetString()!.Contains("counted back from the newest reading", StringComparison.Ordinal));
        Assert.Equal("stale", health.GetProperty("state").GetString());
        Assert.Equal("stale", forecast.GetProperty("healthState").GetString());
        Assert.True(forecast.GetProperty("missingRecentData").GetProperty("missingSteps").GetInt32() > 365 * 24);
        var steps = forecast.GetProperty("steps");
        Assert.Equal(48, steps.GetArrayLength());
        // A year of missing steps: the intervals are as wide as the whole anomaly variance allows, not the next-hour width.
        var sd = steps[0].GetProperty("sd").GetDouble();
        Assert.True(sd > 1.0, $"sd {sd}");
        Assert.True(verification.GetProperty("backtest").GetProperty("origins").GetInt32() > 0);
        Assert.True(forecastTime < TimeSpan.FromSeconds(30), $"forecast took {forecastTime}"); // a guard against an endless walk, not a measurement
    }
}
