using System.Net;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.TestData;

namespace ForecastHub.Api.Tests.Models;

/// <summary>Each model-health state of DESIGN section 6, reached through the real pipeline with a fake clock.</summary>
public sealed class ModelHealthStateTests
{
    [Fact]
    public async Task SiteWithThreeDaysOfDataIsWarmingUpAndGetsNoForecast()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("young");
        await factory.IngestAsync("young", ModelScenario.History(factory, days: 3));

        var health = await client.HealthAsync("young");

        Assert.Equal("warming-up", health.GetProperty("state").GetString());
        Assert.Equal(["insufficient-data"], ModelScenario.ReasonCodes(health));
        Assert.Contains("72 of the 168", health.GetProperty("reasons")[0].GetProperty("message").GetString(), StringComparison.Ordinal);
        var problem = await client.GetJsonAsync("/api/v1/sites/young/forecast", HttpStatusCode.Conflict);
        Assert.Contains("no fitted model", problem.GetProperty("detail").GetString(), StringComparison.Ordinal);
    }

    [Fact]
    public async Task FirstEnoughDataIsFittedInTheBackgroundAndTheSiteIsOk()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("fresh");

        var outcome = await factory.NextFitAsync("fresh", () => factory.IngestAsync("fresh", ModelScenario.History(factory, days: 10)));

        Assert.True(outcome.Succeeded, outcome.Error);
        var health = await client.HealthAsync("fresh");
        Assert.Equal("ok", health.GetProperty("state").GetString());
        Assert.Empty(ModelScenario.ReasonCodes(health));
        Assert.Equal(factory.Clock.GetUtcNow(), health.GetProperty("modelFittedAt").GetDateTimeOffset());
    }

    [Fact]
    public async Task SiteWithoutReadingsForSevenHoursIsStaleButStillForecasts()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("quiet");
        await factory.IngestAsync("quiet", ModelScenario.History(factory, days: 10));
        await client.RefitAsync("quiet");

        factory.Clock.Advance(TimeSpan.FromHours(7));
        var health = await client.HealthAsync("quiet");

        Assert.Equal("stale", health.GetProperty("state").GetString());
        Assert.Equal(["no-recent-data"], ModelScenario.ReasonCodes(health));
        var forecast = await client.GetJsonAsync("/api/v1/sites/quiet/forecast");
        Assert.Equal("stale", forecast.GetProperty("healthState").GetString());
    }

    [Fact]
    public async Task ModelTooSimpleForTheSeriesLeavesNonWhiteResidualsAndIsDrifting()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        // An AR(2) series with strong second-order memory, fitted with at most one lag.
        await client.CreateHourlySiteAsync("underfit", model: new { maxOrder = 1 });
        var now = factory.Clock.GetUtcNow();
        await factory.IngestAsync("underfit", SyntheticSeries.Hourly(now.AddDays(-10), 240, seed: 3, phi: [1.5, -0.6]));
        var model = await client.RefitAsync("underfit");
        Assert.Equal(1, model.GetProperty("ar").GetProperty("order").GetInt32());

        var health = await client.HealthAsync("underfit");

        Assert.Equal("drifting", health.GetProperty("state").GetString());
        Assert.Equal(["residuals-not-white"], ModelScenario.ReasonCodes(health));
    }

    [Fact]
    public async Task NewestReadingsFormingAFlatLineMakeTheSensorSuspect()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("stuck");
        var now = factory.Clock.GetUtcNow();
        await factory.IngestAsync("stuck", SyntheticSeries.HourlyUntil(now.AddHours(-8), 10 * 24, seed: 4));
        await client.RefitAsync("stuck");
        await factory.IngestAsync("stuck", Enumerable.Range(0, 8).Select(h => (now.AddHours(-8 + h), 4.2)));

        var health = await client.HealthAsync("stuck");

        Assert.Equal("sensor-suspect", health.GetProperty("state").GetString());
        var codes = ModelScenario.ReasonCodes(health);
        Assert.Equal("flat-line", codes[0]);
        Assert.Contains("flagged-share-high", codes);
    }

    [Fact]
    public async Task FleetSummaryCountsEveryStateAndListsTheSitesNeedingAttentionMostUrgentFirst()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("a-good");
        await factory.IngestAsync("a-good", ModelScenario.History(factory, days: 10));
        await client.RefitAsync("a-good");
        await client.CreateHourlySiteAsync("b-young");
        await factory.IngestAsync("b-young", ModelScenario.History(factory, days: 2));
        await client.CreateHourlySiteAsync("c-stuck");
        var now = factory.Clock.GetUtcNow();
        await factory.IngestAsync("c-stuck", Enumerable.Range(0, 8).Select(h => (now.AddHours(-8 + h), 4.2)));

        var fleet = await client.GetJsonAsync("/api/v1/health/models");

        Assert.Equal(3, fleet.GetProperty("sites").GetInt32());
        var counts = fleet.GetProperty("counts");
        Assert.Equal(1, counts.GetProperty("ok").GetInt32());
        Assert.Equal(1, counts.GetProperty("warming-up").GetInt32());
        Assert.Equal(1, counts.GetProperty("sensor-suspect").GetInt32());
        Assert.Equal(0, counts.GetProperty("stale").GetInt32());
        var attention = fleet.GetProperty("attention").EnumerateArray().Select(a => a.GetProperty("siteId").GetString()!).ToArray();
        Assert.Equal(["c-stuck", "b-young"], attention);
    }
}
