using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using ForecastHub.Api.Alerts;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;
using ForecastHub.Api.Tests.Webhooks;
using ForecastHub.TestData;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Alerts;

/// <summary>risk.raised and risk.cleared through the real pipeline: a fitted site, its thresholds set by PATCH, a receiver on loopback.</summary>
public sealed class RiskAlertTests
{
    private const string Site = "/api/v1/sites/orchard-1";

    private static object Warm(double valueC) => new { id = "warm", direction = "above", valueC, alertProbability = 0.5 };

    [Fact]
    public async Task ARaiseIsSentOncePerWindowAndClearsWhenTheChanceFalls()
    {
        await using var receiver = await WebhookReceiver.StartAsync();
        await using var factory = WebhookScenario.Factory();
        using var admin = factory.CreateAdminClient();
        var (webhookId, secret) = await FittedSiteWithRiskWebhookAsync(factory, admin, receiver);

        // Above -40 C: every sample path crosses, in both windows.
        using (var patched = await admin.PatchAsJsonAsync(Site, new { thresholds = new[] { Warm(-40) } }))
        {
            Assert.Equal(HttpStatusCode.OK, patched.StatusCode);
        }
        var raised = new[] { await receiver.NextAsync(ModelScenario.Patience), await receiver.NextAsync(ModelScenario.Patience) };

        var windows = new List<string>();
        foreach (var delivery in raised)
        {
            Assert.True(delivery.SignatureValidFor(secret));
            using var body = JsonDocument.Parse(delivery.Body);
            Assert.Equal("risk.raised", body.RootElement.GetProperty("type").GetString());
            var data = body.RootElement.GetProperty("data");
            Assert.Equal("orchard-1", data.GetProperty("siteId").GetString());
            Assert.Equal("warm", data.GetProperty("threshold").GetProperty("id").GetString());
            Assert.Equal(0.5, data.GetProperty("threshold").GetProperty("alertProbability").GetDouble());
            Assert.True(data.GetProperty("probability").GetDouble() >= 0.5);
            Assert.NotEqual(JsonValueKind.Null, data.GetProperty("firstCrossing").ValueKind);
            Assert.True(data.GetProperty("origin").GetDateTimeOffset() <= factory.Clock.GetUtcNow());
            Assert.Equal(2, data.GetProperty("cautions").GetArrayLength());
            windows.Add(data.GetProperty("window").GetProperty("name").GetString()!);
        }
        Assert.Equal(["next24h", "night"], windows.Order(StringComparer.Ordinal));
        var alerts = await admin.GetJsonAsync("/api/v1/alerts");
        Assert.Equal(2, alerts.GetProperty("alerts").GetArrayLength());

        // Repeated forecasts and sweeps later in the same hour find the same risk: nothing more is sent, and nothing
        // is stored again (updatedAt is when the figures last changed).
        static string[] UpdatedAt(JsonElement list) => [.. list.GetProperty("alerts").EnumerateArray().Select(a => a.GetProperty("updatedAt").GetString()!)];
        var updatedAt = UpdatedAt(alerts);
        factory.Clock.Advance(TimeSpan.FromMinutes(10));
        var worker = factory.Services.GetRequiredService<AlertWorker>();
        for (var i = 0; i < 3; i++)
        {
            await admin.GetJsonAsync($"{Site}/forecast");
            await worker.SweepAsync(CancellationToken.None);
        }
        Assert.Equal(2, (await admin.DeliveriesAsync(webhookId)).Length);
        Assert.Equal(updatedAt, UpdatedAt(await admin.GetJsonAsync("/api/v1/alerts")));

        // Above 60 C: no path crosses, below 0.8 x 0.5, so both clear.
        using (var patched = await admin.PatchAsJsonAsync(Site, new { thresholds = new[] { Warm(60) } }))
        {
            Assert.Equal(HttpStatusCode.OK, patched.StatusCode);
        }
        foreach (var delivery in new[] { await receiver.NextAsync(ModelScenario.Patience), await receiver.NextAsync(ModelScenario.Patience) })
        {
            using var body = JsonDocument.Parse(delivery.Body);
            Assert.Equal("risk.cleared", body.RootElement.GetProperty("type").GetString());
            Assert.Equal("below-clear-level", body.RootElement.GetProperty("data").GetProperty("reason").GetString());
        }
        Assert.Empty((await admin.GetJsonAsync("/api/v1/alerts")).GetProperty("alerts").EnumerateArray());
    }

    [Fact]
    public async Task ThePassedWindowClearsAndTheNextOneRaisesAgainAndARemovedThresholdClears()
    {
        await using var receiver = await WebhookReceiver.StartAsync();
        await using var factory = WebhookScenario.Factory();
        using var admin = factory.CreateAdminClient();
        await FittedSiteWithRiskWebhookAsync(factory, admin, receiver);
        using (var patched = await admin.PatchAsJsonAsync(Site, new { thresholds = new object[] { Warm(-40), new { id = "shown", direction = "below", valueC = 60.0 } } }))
        {
            Assert.Equal(HttpStatusCode.OK, patched.StatusCode);
        }
        var first = await NextEventsAsync(receiver, 2);
        Assert.All(first, e => Assert.Equal(("risk.raised", "warm"), (e.Type, e.ThresholdId)));

        // A day later both windows the alerts were raised for have passed: each clears, and the new windows raise again.
        factory.Clock.Advance(TimeSpan.FromHours(25));
        await factory.IngestAsync("orchard-1", SyntheticSeries.HourlyUntil(factory.Clock.GetUtcNow(), 25, seed: 4));
        await factory.Services.GetRequiredService<AlertWorker>().SweepAsync(CancellationToken.None);
        var next = await NextEventsAsync(receiver, 4);
        Assert.Equal(2, next.Count(e => e.Type == "risk.cleared" && e.Reason == "window-passed"));
        var raisedAgain = next.Where(e => e.Type == "risk.raised").ToList();
        Assert.Equal(2, raisedAgain.Count);
        Assert.All(raisedAgain, e => Assert.True(e.From > first.Single(f => f.Window == e.Window).From));

        // A threshold without an alert level is shown but never alerts; removing the alerting one clears what it raised.
        using (var patched = await admin.PatchAsJsonAsync(Site, new { thresholds = new object[] { new { id = "shown", direction = "below", valueC = 60.0 } } }))
        {
            Assert.Equal(HttpStatusCode.OK, patched.StatusCode);
        }
        var removed = await NextEventsAsync(receiver, 2);
        Assert.All(removed, e => Assert.Equal(("risk.cleared", "warm", "threshold-removed"), (e.Type, e.ThresholdId, e.Reason)));
        Assert.Empty((await admin.GetJsonAsync("/api/v1/alerts")).GetProperty("alerts").EnumerateArray());
        await factory.Services.GetRequiredService<AlertWorker>().SweepAsync(CancellationToken.None);
        Assert.False(receiver.HasMore);
    }

    /// <summary>A webhook for risk events and an hourly site fitted on 10 days of synthetic readings up to now.</summary>
    private static async Task<(string WebhookId, string Secret)> FittedSiteWithRiskWebhookAsync(ApiFactory factory, HttpClient admin, WebhookReceiver receiver)
    {
        var webhook = await admin.CreateWebhookAsync(receiver.Url, new { events = new[] { "risk" } });
        await admin.CreateHourlySiteAsync("orchard-1");
        await factory.IngestAsync("orchard-1", SyntheticSeries.HourlyUntil(factory.Clock.GetUtcNow(), 10 * 24, seed: 3));
        await admin.RefitAsync("orchard-1");
        return webhook;
    }

    private sealed record RiskEvent(string Type, string ThresholdId, string Window, DateTimeOffset From, DateTimeOffset To, string? Reason);

    private static async Task<List<RiskEvent>> NextEventsAsync(WebhookReceiver receiver, int count)
    {
        var events = new List<RiskEvent>();
        for (var i = 0; i < count; i++)
        {
            var delivery = await receiver.NextAsync(ModelScenario.Patience);
            using var body = JsonDocument.Parse(delivery.Body);
            var data = body.RootElement.GetProperty("data");
            var window = data.GetProperty("window");
            events.Add(new RiskEvent(
                body.RootElement.GetProperty("type").GetString()!,
                data.GetProperty("threshold").GetProperty("id").GetString()!,
                window.GetProperty("name").GetString()!,
                window.GetProperty("from").GetDateTimeOffset(),
                window.GetProperty("to").GetDateTimeOffset(),
                data.TryGetProperty("reason", out var reason) ? reason.GetString() : null));
        }

        return events;
    }
}
