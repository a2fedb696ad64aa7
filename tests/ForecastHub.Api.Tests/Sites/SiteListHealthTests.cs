using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;

namespace ForecastHub.Api.Tests.Sites;

public sealed class SiteListHealthTests
{
    [Fact]
    public async Task ListedSitesCarryTheHealthStateOfTheirHealthEndpoint()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("fitted");
        await client.CreateHourlySiteAsync("young");
        await client.CreateHourlySiteAsync("silent");
        await factory.IngestAsync("fitted", ModelScenario.History(factory, days: 10));
        await factory.IngestAsync("young", ModelScenario.History(factory, days: 3, seed: 2));
        await client.RefitAsync("fitted");

        var list = await client.GetJsonAsync("/api/v1/sites");

        var states = list.GetProperty("sites").EnumerateArray()
            .ToDictionary(s => s.GetProperty("id").GetString()!, s => s.GetProperty("healthState").GetString());
        Assert.Equal("ok", states["fitted"]);
        Assert.Equal("warming-up", states["young"]);
        foreach (var (id, state) in states)
        {
            Assert.Equal((await client.HealthAsync(id)).GetProperty("state").GetString(), state);
        }

        // The site's own fields are still there, at the top level.
        var first = list.GetProperty("sites")[0];
        Assert.Equal("Europe/Berlin", first.GetProperty("timeZone").GetString());
        Assert.Equal(JsonValueKind.Object, first.GetProperty("model").ValueKind);
        Assert.False(first.TryGetProperty("site", out _));
    }

    [Fact]
    public async Task ListedSiteShowsStaleOnceItsDataStopsArriving()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("fitted");
        await factory.IngestAsync("fitted", ModelScenario.History(factory, days: 10));
        await client.RefitAsync("fitted");

        factory.Clock.Advance(TimeSpan.FromHours(7));
        var site = (await client.GetJsonAsync("/api/v1/sites")).GetProperty("sites")[0];

        Assert.Equal("stale", site.GetProperty("healthState").GetString());
    }
}
