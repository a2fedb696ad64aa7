using System.Net;
using ForecastHub.Api.Models;
using ForecastHub.Api.Verification;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Verification;
using ForecastHub.TestData;
using Microsoft.Extensions.DependencyInjection;
using Xunit.Abstractions;

namespace ForecastHub.Api.Tests.Integrity;

/// <summary>A deleted site leaves nothing behind: a fit that was running when it was deleted is
/// discarded, and a site re-created under the same id starts empty.</summary>
public sealed class DeletedSiteTests(ITestOutputHelper output)
{
    private const int Repetitions = 12;

    [Fact]
    public async Task AFitRunningAcrossDeleteAndRecreateNeverReachesTheNewSite()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        var queue = factory.Services.GetRequiredService<RefitQueue>();
        var models = factory.Services.GetRequiredService<ModelService>();
        // 400 days of hourly readings: enough that the background fit is still running when the delete arrives.
        var history = SyntheticSeries.HourlyUntil(factory.Clock.GetUtcNow(), 400 * 24, seed: 16);
        var discarded = 0;

        for (var i = 0; i < Repetitions; i++)
        {
            await client.CreateHourlySiteAsync("x");
            var fit = models.WhenNextFitAsync("x");
            using (var posted = await client.PostReadings(history, "x"))
            {
                Assert.Equal(HttpStatusCode.OK, posted.StatusCode);
            }

            using (var deleted = await client.DeleteAsync(new Uri("/api/v1/sites/x", UriKind.Relative)))
            {
                Assert.Equal(HttpStatusCode.NoContent, deleted.StatusCode);
            }

            await client.CreateHourlySiteAsync("x");
            await queue.WhenIdleAsync().WaitAsync(ModelScenario.Patience);
            if (fit.IsCompleted && (await fit).Error is { } error && error.Contains("deleted", StringComparison.Ordinal))
            {
                discarded++;
            }

            var model = await client.GetJsonAsync("/api/v1/sites/x/model", HttpStatusCode.NotFound);
            Assert.Contains("no fitted model", model.GetProperty("detail").GetString(), StringComparison.Ordinal);
            var health = await client.HealthAsync("x");
            Assert.NotEqual("ok", health.GetProperty("state").GetString());
            Assert.Empty(await client.AllReadings("x"));

            using var cleanup = await client.DeleteAsync(new Uri("/api/v1/sites/x", UriKind.Relative));
            Assert.Equal(HttpStatusCode.NoContent, cleanup.StatusCode);
        }

        output.WriteLine($"{discarded} of {Repetitions} fits ran across the delete and were discarded.");
    }

    [Fact]
    public async Task ASiteCreatedAgainMeetsNoneOfTheOldSitesArchiveOrCachedAnswers()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        var archive = factory.Services.GetRequiredService<IForecastArchive>();
        var archiveStep = factory.Services.GetServices<ISweepStep>().OfType<DayAheadArchiveStep>().Single();
        var sites = factory.Services.GetRequiredService<ISiteStore>();
        // Tomorrow in Berlin, as the archive step names it at the fake clock's now.
        var tomorrow = new DateOnly(2025, 6, 2);

        await client.CreateHourlySiteAsync("x");
        await factory.IngestAsync("x", ModelScenario.History(factory, days: 20, seed: 21));
        await client.RefitAsync("x");
        var old = (await sites.GetAsync("x"))!;
        await archiveStep.RunAsync(old, CancellationToken.None);
        Assert.True(await archive.HasArchivedAsync("x", tomorrow));
        var oldForecast = (await client.GetJsonAsync("/api/v1/sites/x/forecast")).GetProperty("steps")[0].GetProperty("mean").GetDouble();
        var oldBacktest = (await client.GetJsonAsync("/api/v1/sites/x/verification")).GetProperty("backtest").GetRawText();

        using (var deleted = await client.DeleteAsync(new Uri("/api/v1/sites/x", UriKind.Relative)))
        {
            Assert.Equal(HttpStatusCode.NoContent, deleted.StatusCode);
        }

        await client.CreateHourlySiteAsync("x");
        Assert.False(await archive.HasArchivedAsync("x", tomorrow));
        // Ten degrees warmer, fitted at the same (fake) instant as the deleted site's model.
        await factory.IngestAsync("x", ModelScenario.History(factory, days: 20, seed: 22).Select(r => (r.Time, r.ValueC + 10)));
        await client.RefitAsync("x");
        var renewed = (await sites.GetAsync("x"))!;
        Assert.NotEqual(old.Key, renewed.Key);

        // The sweep step still holding the deleted site's record writes nothing for the new one.
        await archiveStep.RunAsync(old, CancellationToken.None);
        Assert.False(await archive.HasArchivedAsync("x", tomorrow));
        var forecast = (await client.GetJsonAsync("/api/v1/sites/x/forecast")).GetProperty("steps")[0].GetProperty("mean").GetDouble();
        var backtest = (await client.GetJsonAsync("/api/v1/sites/x/verification")).GetProperty("backtest").GetRawText();
        Assert.True(forecast > oldForecast + 5, $"forecast {forecast} after {oldForecast}");
        Assert.NotEqual(oldBacktest, backtest);
        // The new site's own day ahead is archived, though the deleted one's was archived for the same day.
        await archiveStep.RunAsync(renewed, CancellationToken.None);
        Assert.True(await archive.HasArchivedAsync("x", tomorrow));
    }
}
