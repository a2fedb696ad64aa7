using ForecastHub.Api.Tests.Infrastructure;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Models;

/// <summary><c>Refit:MaxLoadedModels</c>: models beyond the cap are dropped from memory and read
/// again from storage, answering the same as before; an out-of-range cap stops the start.</summary>
public sealed class LoadedModelCapTests
{
    [Fact]
    public async Task ModelsBeyondTheCapAreReadAgainFromStorageWithTheSameAnswers()
    {
        await using var factory = new ApiFactory { Settings = new Dictionary<string, string?> { ["Refit:MaxLoadedModels"] = "1" } };
        using var client = factory.CreateAdminClient();
        string[] sites = ["cap-a", "cap-b", "cap-c"];
        var before = new Dictionary<string, string>();
        var queue = factory.Services.GetRequiredService<ForecastHub.Api.Models.RefitQueue>();
        for (var i = 0; i < sites.Length; i++)
        {
            await client.CreateHourlySiteAsync(sites[i]);
            await factory.IngestAsync(sites[i], ModelScenario.History(factory, days: 10, seed: i + 1));

            // The fit the new readings queue is done before the requested one, so no fit follows the answers compared below.
            await queue.WhenIdleAsync().WaitAsync(ModelScenario.Patience);
            await client.RefitAsync(sites[i]);
            await queue.WhenIdleAsync().WaitAsync(ModelScenario.Patience);
            before[sites[i]] = (await client.GetJsonAsync($"/api/v1/sites/{sites[i]}/model")).GetRawText();
        }

        // The alert evaluations the ingests and refits queued load their site's model: done before the reads below.
        await factory.Services.GetRequiredService<ForecastHub.Api.Alerts.AlertQueue>().WhenIdleAsync().WaitAsync(ModelScenario.Patience);

        // Each read evicts the one model held, so every later read goes back to storage.
        var models = factory.Services.GetRequiredService<ForecastHub.Api.Models.ModelService>();
        var held = sites[^1];
        foreach (var site in sites.Reverse().Concat(sites))
        {
            // Only the model read last is held; any other must have been evicted and is read from storage.
            Assert.Equal(site == held, models.IsLoaded(site));
            var model = await client.GetJsonAsync($"/api/v1/sites/{site}/model");
            held = site;

            Assert.Equal(before[site], model.GetRawText());
            Assert.Equal(1, models.LoadedCount);
            Assert.True(models.IsLoaded(site));
        }
    }

    [Theory]
    [InlineData("0")]
    [InlineData("1000001")]
    public async Task OutOfRangeCapStopsTheStartNamingTheKey(string cap)
    {
        await using var factory = new ApiFactory { Settings = new Dictionary<string, string?> { ["Refit:MaxLoadedModels"] = cap } };

        var error = Record.Exception(() => factory.CreateClient());

        Assert.NotNull(error);
        Assert.Contains("Refit:MaxLoadedModels", error.ToString(), StringComparison.Ordinal);
    }
}
