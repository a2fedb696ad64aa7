using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using ForecastHub.Api.Alerts;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;
using ForecastHub.Api.Webhooks;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Webhooks;

/// <summary>Webhooks, and sites whose health changes, for the alerting tests.</summary>
internal static class WebhookScenario
{
    public static ApiFactory Factory(string? databasePath = null, bool keepDatabase = false) => new()
    {
        DatabasePath = databasePath ?? TestFiles.NewDatabasePath(),
        KeepDatabase = keepDatabase,
        Settings = new Dictionary<string, string?> { ["Webhooks:AllowPrivateNetworks"] = "true" },
    };

    public static async Task<(string Id, string Secret)> CreateWebhookAsync(this HttpClient admin, string url, object? extra = null)
    {
        var body = new Dictionary<string, object?> { ["url"] = url };
        foreach (var property in extra?.GetType().GetProperties() ?? [])
        {
            body[property.Name] = property.GetValue(extra);
        }
        using var response = await admin.PostAsJsonAsync(new Uri("/api/v1/webhooks", UriKind.Relative), body);
        Assert.Equal(HttpStatusCode.Created, response.StatusCode);
        var created = await response.Content.ReadFromJsonAsync<JsonElement>();
        return (created.GetProperty("id").GetString()!, created.GetProperty("secret").GetString()!);
    }

    public static async Task<JsonElement[]> DeliveriesAsync(this HttpClient admin, string webhookId) =>
        (await admin.GetJsonAsync($"/api/v1/webhooks/{webhookId}/deliveries")).GetProperty("deliveries").EnumerateArray().ToArray();

    /// <summary>
    /// An hourly site whose first look (a sweep) finds it stale (its newest reading 9 h old), then a flat line of readings up to now
    /// makes it sensor-suspect: one <c>health.changed</c> event, queued by the ingest trigger.
    /// </summary>
    public static async Task MakeSiteSensorSuspectAsync(this ApiFactory factory, HttpClient admin, string siteId)
    {
        await admin.CreateHourlySiteAsync(siteId);
        var now = factory.Clock.GetUtcNow();
        await factory.IngestAsync(siteId, [(now.AddHours(-10), 5.0), (now.AddHours(-9), 6.5)]);
        await factory.Services.GetRequiredService<AlertWorker>().SweepAsync(CancellationToken.None);
        await factory.IngestAsync(siteId, Enumerable.Range(0, 8).Select(i => (now.AddHours(-7 + i), 4.0)));
    }

    public static WebhookDeliveryWorker Deliveries(this ApiFactory factory) => factory.Services.GetRequiredService<WebhookDeliveryWorker>();
}
