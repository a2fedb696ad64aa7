using System.Net;
using ForecastHub.Api.Models;
using ForecastHub.Api.Tests.Infrastructure;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Models;

/// <summary>Refit:Enabled = false: the node ingests and fits on request, but runs no background fits or sweeps.</summary>
public sealed class RefitSwitchTests
{
    [Fact]
    public async Task SwitchedOffNodeLeavesNewDataUnfittedUntilARefitIsRequested()
    {
        await using var factory = new ApiFactory { Settings = new Dictionary<string, string?> { ["Refit:Enabled"] = "false" } };
        using var client = factory.CreateAdminClient();
        var worker = factory.Services.GetRequiredService<RefitWorker>();
        await worker.ExecuteTask!.WaitAsync(ModelScenario.Patience);
        await client.CreateHourlySiteAsync("quiet");

        await factory.IngestAsync("quiet", ModelScenario.History(factory, days: 10));

        // The worker has ended, so the site stays queued and nothing fits it in the background.
        Assert.True(worker.ExecuteTask.IsCompletedSuccessfully);
        Assert.Equal(1, factory.Services.GetRequiredService<RefitQueue>().Count);
        await client.GetJsonAsync("/api/v1/sites/quiet/model", HttpStatusCode.NotFound);
        var model = await client.RefitAsync("quiet");
        Assert.Equal(factory.Clock.GetUtcNow(), model.GetProperty("fittedAt").GetDateTimeOffset());
    }

    [Fact]
    public async Task ByDefaultNewDataIsFittedInTheBackground()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("busy");

        var outcome = await factory.NextFitAsync("busy", () => factory.IngestAsync("busy", ModelScenario.History(factory, days: 10)));

        Assert.True(outcome.Succeeded, outcome.Error);
        Assert.False(factory.Services.GetRequiredService<RefitWorker>().ExecuteTask!.IsCompleted);
    }
}
