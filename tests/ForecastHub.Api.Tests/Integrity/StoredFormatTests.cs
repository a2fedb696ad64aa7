using System.Net;
using System.Text.Json;
using ForecastHub.Api.Models;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;
using ForecastHub.Api.Tests.TestSupport;
using ForecastHub.Api.Verification;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Verification;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Integrity;

/// <summary>Stored models, archived days and day scores carry a format number; a text of an older or
/// newer format is never read into the records: a model is refitted, an archived day is scored empty.</summary>
public sealed class StoredFormatTests
{
    // Written by the build before formats were versioned (enums as integers, no "format" field), for
    // site "x" with 20 days of SyntheticSeries seed 21 at ApiFactory.Now.
    private static readonly string UnversionedModel = RepoFiles.Read("tests", "ForecastHub.Api.Tests", "Integrity", "Fixtures", "model-unversioned.json");

    private static readonly JsonSerializerOptions UnversionedArchiveJson = new(JsonSerializerDefaults.Web)
    {
        NumberHandling = System.Text.Json.Serialization.JsonNumberHandling.AllowNamedFloatingPointLiterals,
    };

    [Fact]
    public void TheUnversionedLayoutAndANewerFormatAreRefused()
    {
        Assert.Null(ModelJson.TryRead(UnversionedModel, out var old));
        Assert.Null(old);

        var newer = NewerFormat(UnversionedModel);
        Assert.Null(ModelJson.TryRead(newer, out var future));
        Assert.Equal(99, future);

        using var document = JsonDocument.Parse(UnversionedModel);
        Assert.Equal(0, document.RootElement.GetProperty("Cadence").GetInt32());
    }

    [Fact]
    public async Task AModelOfTheUnversionedFormatServesNothingAndARequestedRefitReplacesIt()
    {
        // No background worker: what the service answers while the stored model is unreadable stays observable.
        await using var factory = new ApiFactory { Settings = new Dictionary<string, string?> { ["Refit:Enabled"] = "false" } };
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("x");
        await factory.IngestAsync("x", ModelScenario.History(factory, days: 20, seed: 21));
        await PlantModelAsync(factory, "x", UnversionedModel);

        var model = await client.GetJsonAsync("/api/v1/sites/x/model", HttpStatusCode.NotFound);
        Assert.Contains("unversioned first format", model.GetProperty("detail").GetString(), StringComparison.Ordinal);
        var health = await client.HealthAsync("x");
        Assert.Equal("stale", health.GetProperty("state").GetString());
        Assert.Contains("model-outdated", ModelScenario.ReasonCodes(health));
        Assert.True(!health.TryGetProperty("modelFittedAt", out var fittedAt) || fittedAt.ValueKind == JsonValueKind.Null);
        var forecast = await client.GetJsonAsync("/api/v1/sites/x/forecast", HttpStatusCode.Conflict);
        Assert.Contains("does not read", forecast.GetProperty("detail").GetString(), StringComparison.Ordinal);

        await client.RefitAsync("x");

        await AssertServesCurrentFormatAsync(factory, client, "x");
    }

    [Fact]
    public async Task AModelOfANewerFormatIsQueuedForARefitAndReplaced()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        var queue = factory.Services.GetRequiredService<RefitQueue>();
        await client.CreateHourlySiteAsync("x");
        await factory.IngestAsync("x", ModelScenario.History(factory, days: 20, seed: 21));
        await queue.WhenIdleAsync().WaitAsync(ModelScenario.Patience);
        var current = (await factory.Services.GetRequiredService<IModelStore>().GetAsync("x"))!.ModelJson;
        await PlantModelAsync(factory, "x", NewerFormat(current));

        // The health answer looks at the stored model, finds it unreadable, and queues the refit.
        var health = await client.HealthAsync("x");
        Assert.Equal("stale", health.GetProperty("state").GetString());
        var reason = health.GetProperty("reasons").EnumerateArray().Single(r => r.GetProperty("code").GetString() == "model-outdated");
        Assert.Contains("format 99", reason.GetProperty("message").GetString(), StringComparison.Ordinal);

        await queue.WhenIdleAsync().WaitAsync(ModelScenario.Patience);

        await AssertServesCurrentFormatAsync(factory, client, "x");
        Assert.Equal("ok", (await client.HealthAsync("x")).GetProperty("state").GetString());
    }

    [Fact]
    public async Task AnArchivedDayOrScoreOfAnotherFormatIsScoredEmptyOrLeftOutNeverMisread()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        var archive = factory.Services.GetRequiredService<IForecastArchive>();
        var archiveStep = factory.Services.GetServices<ISweepStep>().OfType<DayAheadArchiveStep>().Single();
        await client.CreateHourlySiteAsync("x");
        await factory.IngestAsync("x", ModelScenario.History(factory, days: 20, seed: 21));
        await client.RefitAsync("x");
        var site = (await factory.Services.GetRequiredService<ISiteStore>().GetAsync("x"))!;
        var model = (await factory.Services.GetRequiredService<IModelStore>().GetAsync("x"))!;

        // Two ended days as the unversioned build archived them, with steps a misreading would score.
        var now = factory.Clock.GetUtcNow();
        foreach (var date in new[] { new DateOnly(2025, 5, 29), new DateOnly(2025, 5, 30) })
        {
            var start = new DateTimeOffset(date.ToDateTime(TimeOnly.MinValue), TimeSpan.FromHours(2));
            var steps = Enumerable.Range(0, 24).Select(h => new ArchivedStep(start.AddHours(h), 15, 1, [13.7, 13], [16.3, 17])).ToList();
            var json = JsonSerializer.Serialize(new ArchivedDay([0.80, 0.95], steps), UnversionedArchiveJson);
            Assert.True(await archive.ArchiveAsync(new ArchivedForecast("x", site.Key, date, start.AddDays(-1), start.AddDays(-1), model.FittedAt, json)));
        }

        // A score of a newer format for a third day.
        var scoreJson = DayScore.Format.Write(new DayScore(new DateOnly(2025, 5, 28), now.AddDays(-4), [0.8], []))
            .Replace("\"format\":2", "\"format\":99", StringComparison.Ordinal);
        Assert.True(await archive.SaveScoreAsync(new LiveScore("x", site.Key, new DateOnly(2025, 5, 28), now, scoreJson)));

        await archiveStep.RunAsync(site, CancellationToken.None);

        var scores = await archive.ListScoresAsync("x", new DateOnly(2025, 5, 1), 10);
        Assert.Equal(3, scores.Count);
        var readable = DayScore.ReadStored(scores);
        Assert.Equal([new DateOnly(2025, 5, 30), new DateOnly(2025, 5, 29)], readable.Select(d => d.Date));
        Assert.All(readable, d => Assert.Empty(d.Points));
        var verification = await client.GetJsonAsync("/api/v1/sites/x/verification");
        var live = verification.GetProperty("live");
        Assert.Equal(0, live.GetProperty("days").GetInt32());
        Assert.Equal(2, live.GetProperty("daily").GetArrayLength());
    }

    private static string NewerFormat(string json)
    {
        using var document = JsonDocument.Parse(json);
        var body = document.RootElement.TryGetProperty("model", out var inner) ? inner.GetRawText() : json;
        return $$"""{"format":99,"model":{{body}}}""";
    }

    /// <summary>Stores <paramref name="json"/> as the site's model through the real store, as an older or newer build would have, and drops the copy in memory (as a restart would).</summary>
    private static async Task PlantModelAsync(ApiFactory factory, string siteId, string json)
    {
        var site = (await factory.Services.GetRequiredService<ISiteStore>().GetAsync(siteId))!;
        var store = factory.Services.GetRequiredService<IModelStore>();
        var at = factory.Clock.GetUtcNow();
        Assert.True(await store.SaveAsync(new StoredModel(siteId, site.Key, at, 1, site.SettingsVersion, at.AddHours(-1), 480, 0.5, json)));
        factory.Services.GetRequiredService<ModelService>().Forget(siteId);
    }

    private static async Task AssertServesCurrentFormatAsync(ApiFactory factory, HttpClient client, string siteId)
    {
        var stored = (await factory.Services.GetRequiredService<IModelStore>().GetAsync(siteId))!.ModelJson;
        using var document = JsonDocument.Parse(stored);
        Assert.Equal(ModelJson.Format.Version, document.RootElement.GetProperty("format").GetInt32());
        Assert.Equal("hourly", document.RootElement.GetProperty("model").GetProperty("cadence").GetString());
        Assert.NotNull(ModelJson.TryRead(stored, out _));
        // Written again from what was read, the text is the same: the format round-trips.
        Assert.Equal(stored, ModelJson.Write(ModelJson.TryRead(stored, out _)!));

        var model = await client.GetJsonAsync($"/api/v1/sites/{siteId}/model");
        Assert.Equal(factory.Clock.GetUtcNow(), model.GetProperty("fittedAt").GetDateTimeOffset());
        await client.GetJsonAsync($"/api/v1/sites/{siteId}/forecast");
    }
}
