using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using ForecastHub.Api.Models;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Storage.Readings;
using ForecastHub.TestData;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Models;

/// <summary>Sites with synthetic history for the model, forecast and health tests.</summary>
internal static class ModelScenario
{
    /// <summary>How long a test waits for background work before failing (a guard, not a measurement).</summary>
    public static readonly TimeSpan Patience = TimeSpan.FromSeconds(60);

    public static async Task CreateHourlySiteAsync(this HttpClient client, string id, object? model = null, object? quality = null)
    {
        using var response = await client.CreateSite(Some.Site(id, quality: quality, model: model));
        Assert.Equal(HttpStatusCode.Created, response.StatusCode);
    }

    /// <summary>Stores readings through the service's reading store (the path the observations endpoint uses).</summary>
    public static async Task IngestAsync(this ApiFactory factory, string siteId, IEnumerable<(DateTimeOffset Time, double ValueC)> readings)
    {
        var store = factory.Services.GetRequiredService<IReadingStore>();
        var incoming = readings.Select((r, i) => new IncomingReading(i, r.Time.ToUnixTimeMilliseconds(), r.ValueC, r.ValueC, "C")).ToList();
        var result = await store.IngestAsync(siteId, incoming, ConflictPolicy.Reject, factory.Clock.GetUtcNow());
        Assert.NotNull(result);
    }

    /// <summary>Days of synthetic hourly history ending at the hour before the fake clock's now.</summary>
    public static IReadOnlyList<(DateTimeOffset Time, double ValueC)> History(ApiFactory factory, int days, int seed = 1) =>
        SyntheticSeries.HourlyUntil(factory.Clock.GetUtcNow(), days * 24, seed);

    public static async Task<JsonElement> RefitAsync(this HttpClient client, string siteId)
    {
        using var response = await client.PostAsync(new Uri($"/api/v1/sites/{siteId}/model/refit", UriKind.Relative), null);
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        return await response.Content.ReadFromJsonAsync<JsonElement>();
    }

    public static async Task<JsonElement> GetJsonAsync(this HttpClient client, string path, HttpStatusCode expected = HttpStatusCode.OK)
    {
        using var response = await client.GetAsync(new Uri(path, UriKind.Relative));
        var body = await response.Content.ReadAsStringAsync();
        Assert.True(expected == response.StatusCode, $"GET {path} answered {(int)response.StatusCode}: {body}");
        return JsonDocument.Parse(body).RootElement.Clone();
    }

    public static Task<JsonElement> HealthAsync(this HttpClient client, string siteId) => client.GetJsonAsync($"/api/v1/sites/{siteId}/health");

    public static string[] ReasonCodes(JsonElement health) =>
        [.. health.GetProperty("reasons").EnumerateArray().Select(r => r.GetProperty("code").GetString()!)];

    /// <summary>Awaits the next fit of the site that <paramref name="trigger"/> causes.</summary>
    public static async Task<RefitOutcome> NextFitAsync(this ApiFactory factory, string siteId, Func<Task> trigger)
    {
        var next = factory.Services.GetRequiredService<ModelService>().WhenNextFitAsync(siteId);
        await trigger();
        return await next.WaitAsync(Patience);
    }
}
