using System.Text.Json;
using ForecastHub.Api.Forecasts;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;
using ForecastHub.TestData;
using Microsoft.AspNetCore.Http;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Forecasts;

/// <summary>Forecast answers served from memory: the stored JSON is what a fresh serialisation gives, and new data replaces it.</summary>
public sealed class ForecastCacheTests
{
    private const string ForecastPath = "/api/v1/sites/orchard-1/forecast?steps=48&levels=80,95";

    [Fact]
    public async Task RepeatedForecastIsTheSameJsonWithTheSameContentTypeAsTheFirst()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await FittedSiteAsync(factory, client);

        var (firstBody, firstType) = await GetAsync(client);
        var (secondBody, secondType) = await GetAsync(client);

        Assert.Equal(firstBody, secondBody);
        Assert.Equal("application/json; charset=utf-8", firstType);
        Assert.Equal(firstType, secondType);
        // The stored bytes are what the framework's Ok<ForecastResponse> writes for the same record.
        var record = JsonSerializer.Deserialize<ForecastResponse>(firstBody, JsonSerializerOptions.Web)!;
        var (okBody, okType) = await WriteAsOkAsync(factory, record);
        Assert.Equal(okType, firstType);
        Assert.Equal(System.Text.Encoding.UTF8.GetString(okBody), System.Text.Encoding.UTF8.GetString(firstBody));
    }

    [Fact]
    public async Task ARepeatedForecastIsServedFromTheCache()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await FittedSiteAsync(factory, client);

        var (first, _) = await GetAsync(client);
        var (hitsBefore, missesBefore) = await CacheCountsAsync(client);
        var (second, _) = await GetAsync(client);
        var (hitsAfter, missesAfter) = await CacheCountsAsync(client);

        Assert.Equal(first, second);
        Assert.Equal((hitsBefore + 1, missesBefore), (hitsAfter, missesAfter));
        Assert.Equal(1, missesBefore);
    }

    [Fact]
    public async Task NewReadingsReplaceTheStoredAnswer()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        var history = await FittedSiteAsync(factory, client);
        var before = JsonDocument.Parse((await GetAsync(client)).Body).RootElement.Clone();

        var now = factory.Clock.GetUtcNow();
        await factory.IngestAsync("orchard-1", [(now, history[^1].ValueC + 0.3)]);
        var after = JsonDocument.Parse((await GetAsync(client)).Body).RootElement.Clone();

        Assert.Equal(now.AddHours(-1), before.GetProperty("origin").GetDateTimeOffset());
        Assert.Equal(now, after.GetProperty("origin").GetDateTimeOffset());
    }

    private static async Task<(byte[] Body, string? ContentType)> WriteAsOkAsync(ApiFactory factory, ForecastResponse record)
    {
        using var scope = factory.Services.CreateScope();
        using var body = new MemoryStream();
        var context = new DefaultHttpContext { RequestServices = scope.ServiceProvider };
        context.Response.Body = body;
        await TypedResults.Ok(record).ExecuteAsync(context);
        return (body.ToArray(), context.Response.ContentType);
    }

    private static async Task<IReadOnlyList<(DateTimeOffset Time, double ValueC)>> FittedSiteAsync(ApiFactory factory, HttpClient client)
    {
        var history = SyntheticSeries.HourlyUntil(factory.Clock.GetUtcNow(), 10 * 24, seed: 3);
        await client.CreateHourlySiteAsync("orchard-1");
        await factory.IngestAsync("orchard-1", history);
        await client.RefitAsync("orchard-1");
        return history;
    }

    // Forecast answers counted by the service's metrics, by whether the cache held them.
    private static async Task<(int Hits, int Misses)> CacheCountsAsync(HttpClient client)
    {
        var page = await client.GetStringAsync(new Uri("/metrics", UriKind.Relative));
        int Count(string cache) => page.Split('\n')
            .Where(l => l.StartsWith($"forecasthub_forecast_duration_seconds_count{{cache=\"{cache}\"}} ", StringComparison.Ordinal))
            .Select(l => int.Parse(l[(l.LastIndexOf(' ') + 1)..], System.Globalization.CultureInfo.InvariantCulture))
            .SingleOrDefault();
        return (Count("hit"), Count("miss"));
    }

    private static async Task<(byte[] Body, string? ContentType)> GetAsync(HttpClient client)
    {
        using var response = await client.GetAsync(new Uri(ForecastPath, UriKind.Relative));
        Assert.Equal(System.Net.HttpStatusCode.OK, response.StatusCode);
        return (await response.Content.ReadAsByteArrayAsync(), response.Content.Headers.ContentType?.ToString());
    }
}
