using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using ForecastHub.Api.Forecasts;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;
using ForecastHub.Storage.Sites;
using ForecastHub.TestData;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Risk;

/// <summary>Site thresholds and night hours through the real pipeline: validation, storage, and the risk in the forecast.</summary>
public sealed class SiteThresholdsTests
{
    private static readonly Uri Orchard = new("/api/v1/sites/orchard-1", UriKind.Relative);

    private static object Frost(double value = 0.5, double? alert = 0.3) => new { id = "frost", direction = "below", valueC = value, alertProbability = alert };

    [Fact]
    public async Task ThresholdsAndNightAreStoredWithTheSiteAndChangedByPatchWithoutARefit()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        using var created = await client.PostAsJsonAsync("/api/v1/sites", new
        {
            id = "orchard-1", name = "Orchard", timeZone = "Europe/Berlin", cadence = "hourly",
            thresholds = new object[] { Frost(), new { id = "heat", direction = "above", valueC = 30.0 } },
        });
        Assert.Equal(HttpStatusCode.Created, created.StatusCode);
        var site = await created.Content.ReadFromJsonAsync<JsonElement>();
        Assert.Equal(2, site.GetProperty("thresholds").GetArrayLength());
        Assert.Equal("18:00", site.GetProperty("night").GetProperty("startLocal").GetString());
        Assert.Equal("09:00", site.GetProperty("night").GetProperty("endLocal").GetString());
        Assert.Equal(JsonValueKind.Null, site.GetProperty("thresholds")[1].GetProperty("alertProbability").ValueKind);
        var version = site.GetProperty("settingsVersion").GetInt64();

        using var patched = await client.PatchAsJsonAsync(Orchard, new { thresholds = new[] { Frost(-1) }, night = new { startLocal = "20:00" } });
        Assert.Equal(HttpStatusCode.OK, patched.StatusCode);

        var read = await client.GetFromJsonAsync<JsonElement>(Orchard);
        var threshold = Assert.Single(read.GetProperty("thresholds").EnumerateArray());
        Assert.Equal(-1, threshold.GetProperty("valueC").GetDouble());
        Assert.Equal("20:00", read.GetProperty("night").GetProperty("startLocal").GetString());
        Assert.Equal("09:00", read.GetProperty("night").GetProperty("endLocal").GetString());
        Assert.Equal(version, read.GetProperty("settingsVersion").GetInt64());

        using var cleared = await client.PatchAsJsonAsync(Orchard, new { thresholds = Array.Empty<object>() });
        Assert.Empty((await client.GetFromJsonAsync<JsonElement>(Orchard)).GetProperty("thresholds").EnumerateArray());
    }

    [Theory]
    [InlineData("""{"thresholds":[{"id":"Frost","direction":"below","valueC":0}]}""", "thresholds[0].id")]
    [InlineData("""{"thresholds":[{"id":"frost","direction":"under","valueC":0}]}""", "thresholds[0].direction")]
    [InlineData("""{"thresholds":[{"id":"frost","direction":"below"}]}""", "thresholds[0].valueC")]
    [InlineData("""{"thresholds":[{"id":"frost","direction":"below","valueC":99}]}""", "thresholds[0].valueC")]
    [InlineData("""{"thresholds":[{"id":"frost","direction":"below","valueC":0,"alertProbability":0}]}""", "thresholds[0].alertProbability")]
    [InlineData("""{"thresholds":[{"id":"frost","direction":"below","valueC":0,"alertProbability":1.5}]}""", "thresholds[0].alertProbability")]
    [InlineData("""{"thresholds":[{"id":"a","direction":"below","valueC":0},{"id":"a","direction":"above","valueC":20}]}""", "thresholds[1].id")]
    [InlineData("""{"thresholds":[{"id":"a1","direction":"below","valueC":0},{"id":"a2","direction":"below","valueC":0},{"id":"a3","direction":"below","valueC":0},{"id":"a4","direction":"below","valueC":0},{"id":"a5","direction":"below","valueC":0},{"id":"a6","direction":"below","valueC":0},{"id":"a7","direction":"below","valueC":0},{"id":"a8","direction":"below","valueC":0},{"id":"a9","direction":"below","valueC":0}]}""", "thresholds")]
    [InlineData("""{"night":{"startLocal":"25:00"}}""", "night.startLocal")]
    [InlineData("""{"night":{"startLocal":"6pm"}}""", "night.startLocal")]
    [InlineData("""{"night":{"startLocal":"09:00"}}""", "night.endLocal")]
    public async Task BadThresholdsOrNightAreRefusedWithTheFieldNamedAndNothingChanges(string patch, string field)
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateSite(Some.Site());
        using var first = await client.PatchAsJsonAsync(Orchard, new { thresholds = new[] { Frost() } });
        var before = await client.GetStringAsync(Orchard);

        using var content = new StringContent(patch, System.Text.Encoding.UTF8, "application/json");
        using var response = await client.PatchAsync(Orchard, content);

        await ProblemAssert.NamesField(response, HttpStatusCode.BadRequest, field);
        Assert.Equal(before, await client.GetStringAsync(Orchard));
    }

    [Fact]
    public async Task ForecastCarriesStepProbabilitiesRiskPerWindowConfidenceAndCautionsAndFollowsThresholdChanges()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        var history = SyntheticSeries.HourlyUntil(factory.Clock.GetUtcNow(), 10 * 24, seed: 3);
        await client.CreateHourlySiteAsync("orchard-1");
        await factory.IngestAsync("orchard-1", history);
        await client.RefitAsync("orchard-1");
        var low = history.Min(h => h.ValueC) + 2;
        using (await client.PatchAsJsonAsync(Orchard, new { thresholds = new[] { Frost(low) } }))
        {
        }

        var forecast = await client.GetFromJsonAsync<JsonElement>("/api/v1/sites/orchard-1/forecast?above=25");

        var step = forecast.GetProperty("steps")[0];
        var probabilities = step.GetProperty("probabilities");
        Assert.Equal(2, probabilities.GetArrayLength());
        Assert.Equal("frost", probabilities[0].GetProperty("id").GetString());
        Assert.Equal(low, probabilities[0].GetProperty("threshold").GetDouble());
        Assert.Equal(JsonValueKind.Null, probabilities[1].GetProperty("id").ValueKind);
        Assert.Equal("above", probabilities[1].GetProperty("direction").GetString());
        var risk = forecast.GetProperty("risk").EnumerateArray().ToArray();
        Assert.Equal(4, risk.Length);
        var night = risk.Single(r => r.GetProperty("id").GetString() == "frost" && r.GetProperty("window").GetProperty("name").GetString() == "night");
        Assert.InRange(night.GetProperty("probability").GetDouble(), 0, 1);
        Assert.Equal(0.3, night.GetProperty("alertProbability").GetDouble());
        Assert.True(night.TryGetProperty("expectedHoursBeyond", out _));
        Assert.True(night.GetProperty("extreme").GetProperty("intervals").GetArrayLength() == 2);
        Assert.Equal("normal", forecast.GetProperty("confidence").GetString());
        Assert.Equal(ForecastCautions.All.Count, forecast.GetProperty("cautions").GetArrayLength());

        // A threshold change re-evaluates at once, though data and model are unchanged.
        using (await client.PatchAsJsonAsync(Orchard, new { thresholds = new[] { Frost(low - 30) } }))
        {
        }

        var after = await client.GetFromJsonAsync<JsonElement>("/api/v1/sites/orchard-1/forecast?above=25");
        Assert.Equal(low - 30, after.GetProperty("steps")[0].GetProperty("probabilities")[0].GetProperty("threshold").GetDouble());
        Assert.All(after.GetProperty("risk").EnumerateArray().Where(r => r.GetProperty("id").GetString() == "frost"),
            r => Assert.Equal(0, r.GetProperty("probability").GetDouble()));

        // The service entry point gives the same risk as the answer.
        var site = await factory.Services.GetRequiredService<ISiteStore>().GetAsync("orchard-1");
        var (siteRisk, _) = await factory.Services.GetRequiredService<SiteRiskService>().EvaluateAsync(site!, null, CancellationToken.None);
        Assert.Equal(2, siteRisk!.Risk.Count);
        Assert.Equal("normal", siteRisk.Confidence);
        Assert.NotEmpty(siteRisk.Cautions);
    }

    [Fact]
    public async Task ASuspectSensorReducesConfidenceAndTheAnswerSaysWhereTheForecastStarts()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        var now = factory.Clock.GetUtcNow();
        var history = SyntheticSeries.HourlyUntil(now.AddHours(-8), 10 * 24, seed: 3);
        await client.CreateHourlySiteAsync("orchard-1");
        await factory.IngestAsync("orchard-1", history);
        await client.RefitAsync("orchard-1");
        var stuck = Enumerable.Range(0, 8).Select(i => (now.AddHours(-7 + i), 4.25)).ToArray();
        await factory.IngestAsync("orchard-1", stuck);

        var forecast = await client.GetFromJsonAsync<JsonElement>("/api/v1/sites/orchard-1/forecast");

        Assert.Equal("reduced", forecast.GetProperty("confidence").GetString());
        var reason = forecast.GetProperty("confidenceReason");
        Assert.Equal("sensor-suspect", reason.GetProperty("code").GetString());
        var origin = forecast.GetProperty("origin").GetDateTimeOffset();
        Assert.Equal(history[^1].Time, origin);
        Assert.Contains(origin.ToString("O", System.Globalization.CultureInfo.InvariantCulture), reason.GetProperty("message").GetString(), StringComparison.Ordinal);
        Assert.Equal(ForecastCautions.All.Count, forecast.GetProperty("cautions").GetArrayLength());
    }
}
