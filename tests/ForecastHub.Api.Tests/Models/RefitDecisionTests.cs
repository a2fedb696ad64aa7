using System.Collections.Concurrent;
using ForecastHub.Api.Models;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.TestSupport;
using ForecastHub.Storage;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.TestData;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Models;

/// <summary>The background refit decision is answered from the reading index: a site that is not due costs no read of its rows.</summary>
public sealed class RefitDecisionTests
{
    private static readonly long WindowLongMs = (long)TimeSpan.FromDays(30).TotalMilliseconds;

    [Fact]
    public async Task ABackgroundCheckOfASiteThatIsNotDueReadsNoRowsAndOneThatIsDueReadsTheWindowOnce()
    {
        var reads = new ConcurrentQueue<(long FromMs, long ToMs)>();
        await using var factory = new ApiFactory
        {
            // No background worker: the checks below are the only refit decisions. No window row cache: every fit reads its window.
            Settings = new Dictionary<string, string?> { ["Refit:Enabled"] = "false", ["Refit:WindowCacheMegabytes"] = "0" },
            TestServices = services => services.AddSingleton<IReadingStore>(sp =>
                new RecordingReadingStore(sp.GetRequiredKeyedService<IReadingStore>(StorageOptions.Sqlite), reads)),
        };
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("checked");
        await factory.IngestAsync("checked", ModelScenario.History(factory, days: 20));
        await client.RefitAsync("checked");
        var models = factory.Services.GetRequiredService<ModelService>();
        var site = (await factory.Services.GetRequiredService<ISiteStore>().GetAsync("checked"))!;
        reads.Clear();

        var (reason, outcome) = await models.RefitIfDueAsync(site, force: false, CancellationToken.None);

        Assert.Null(reason);
        Assert.Null(outcome);
        // Forecast and alert work read a few recent days at most; only a fit reads the window.
        Assert.DoesNotContain(reads, r => r.ToMs - r.FromMs >= WindowLongMs);

        factory.Clock.Advance(TimeSpan.FromDays(1));
        await factory.IngestAsync("checked", SyntheticSeries.HourlyUntil(factory.Clock.GetUtcNow(), 24, seed: 2));
        (reason, outcome) = await models.RefitIfDueAsync(site, force: false, CancellationToken.None);

        Assert.Equal(RefitReason.NewData, reason);
        Assert.True(outcome!.Succeeded, outcome.Error);
        Assert.Single(reads, r => r.ToMs - r.FromMs >= WindowLongMs);
    }

    [Fact]
    public async Task ACheckAfterARefitKeepsTheModelInMemoryOnAClockFinerThanAMillisecond()
    {
        await using var factory = new ApiFactory { Settings = new Dictionary<string, string?> { ["Refit:Enabled"] = "false" } };
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("checked");
        await factory.IngestAsync("checked", ModelScenario.History(factory, days: 20));
        // The system clock has ticks below a millisecond; the store keeps whole milliseconds.
        factory.Clock.Advance(TimeSpan.FromTicks(1234));
        await client.RefitAsync("checked");
        var models = factory.Services.GetRequiredService<ModelService>();
        var site = (await factory.Services.GetRequiredService<ISiteStore>().GetAsync("checked"))!;
        Assert.True(models.IsLoaded("checked"));

        var (reason, _) = await models.RefitIfDueAsync(site, force: false, CancellationToken.None);

        Assert.Null(reason);
        Assert.True(models.IsLoaded("checked"));
    }
}
