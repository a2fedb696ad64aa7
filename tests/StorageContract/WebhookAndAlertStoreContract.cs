using ForecastHub.Storage.Alerts;
using ForecastHub.Storage.Webhooks;

namespace ForecastHub.Storage.Contract;

/// <summary>What every <see cref="IWebhookStore"/> and <see cref="IAlertStore"/> must do: the outbox,
/// the delivery log, the alert state, and a site's deletion reaching both.</summary>
public abstract class WebhookAndAlertStoreContract : StorageContract
{
    private static readonly DateTimeOffset T0 = new(2026, 10, 20, 16, 0, 0, TimeSpan.Zero);

    private static WebhookRecord Webhook(string id, string[]? sites = null, string[]? events = null) =>
        new(id, $"https://hooks.example.org/{id}", "whsec_" + Convert.ToBase64String(new byte[32]), sites ?? [], events ?? ["risk", "health"], T0);

    private static OutgoingEvent Health(string siteId) => new("health", "health.changed", siteId, $$"""{"siteId":"{{siteId}}"}""");

    private static RaisedAlert Raised(string siteId, string window = "night") =>
        new(siteId, "frost", window, T0.AddHours(2), T0.AddHours(17), T0, T0, """{"probability":0.4}""");

    private async Task<long> KeyOfAsync(string siteId) => (await Backend.Sites.GetAsync(siteId))!.Key;

    /// <summary>The backend with two sites, site-a and site-b.</summary>
    private async Task<IStorageBackend> OpenAsync()
    {
        await CreateSiteAsync("site-a");
        await CreateSiteAsync("site-b");
        return Backend;
    }

    [Fact]
    public async Task AnEventIsQueuedOncePerCoveringWebhook()
    {
        var b = await OpenAsync();
        var webhooks = b.Webhooks;
        await webhooks.CreateAsync(Webhook("wh-all"));
        await webhooks.CreateAsync(Webhook("wh-site-a", sites: ["site-a"]));
        await webhooks.CreateAsync(Webhook("wh-site-b", sites: ["site-b"]));
        await webhooks.CreateAsync(Webhook("wh-risk", events: ["risk"]));

        Assert.Equal(2, await webhooks.EnqueueAsync(Health("site-a"), T0));

        var due = await webhooks.DueAsync(T0, T0, 10);
        Assert.Equal(["wh-all", "wh-site-a"], due.Select(d => d.Delivery.WebhookId).Order(StringComparer.Ordinal));
        Assert.All(due, d => Assert.Equal(DeliveryStatus.Pending, d.Delivery.Status));
        Assert.NotEqual(due[0].Delivery.MessageId, due[1].Delivery.MessageId);
        Assert.Equal(T0, await webhooks.NextDueAsync());
    }

    [Fact]
    public async Task AttemptsAreCountedAndAFailureWaitsForItsNextTime()
    {
        var b = await OpenAsync();
        var webhooks = b.Webhooks;
        await webhooks.CreateAsync(Webhook("wh-all"));
        await webhooks.EnqueueAsync(Health("site-a"), T0);
        var message = (await webhooks.DueAsync(T0, T0, 10))[0].Delivery.MessageId;

        Assert.True(await webhooks.RecordAttemptAsync(message, new DeliveryAttempt(DeliveryStatus.Pending, T0, T0.AddMinutes(1), 500, "HTTP 500")));

        Assert.Empty(await webhooks.DueAsync(T0.AddSeconds(59), T0.AddSeconds(59), 10));
        var retry = Assert.Single(await webhooks.DueAsync(T0.AddMinutes(1), T0.AddMinutes(1), 10)).Delivery;
        Assert.Equal((1, 500, "HTTP 500"), (retry.Attempts, retry.LastStatusCode, retry.LastError));

        Assert.True(await webhooks.RecordAttemptAsync(message, new DeliveryAttempt(DeliveryStatus.Delivered, T0.AddMinutes(1), null, 204, null)));
        Assert.False(await webhooks.RecordAttemptAsync(message, new DeliveryAttempt(DeliveryStatus.Delivered, T0.AddMinutes(2), null, 204, null)));
        var done = Assert.Single(await webhooks.ListDeliveriesAsync("wh-all", null, 10));
        Assert.Equal((DeliveryStatus.Delivered, 2), (done.Status, done.Attempts));
        Assert.Null(await webhooks.NextDueAsync());
    }

    [Fact]
    public async Task DeliveryLogIsNewestFirstAndPaged()
    {
        var b = await OpenAsync();
        var webhooks = b.Webhooks;
        await webhooks.CreateAsync(Webhook("wh-all"));
        for (var i = 0; i < 5; i++)
        {
            await webhooks.EnqueueAsync(Health("site-a"), T0.AddMinutes(i));
        }

        var first = await webhooks.ListDeliveriesAsync("wh-all", null, 3);
        var rest = await webhooks.ListDeliveriesAsync("wh-all", first[^1].Seq, 3);

        Assert.Equal([4, 3, 2, 1, 0], first.Concat(rest).Select(d => (int)(d.CreatedAt - T0).TotalMinutes));
    }

    [Fact]
    public async Task DeletingAWebhookRemovesItsPendingDeliveries()
    {
        var b = await OpenAsync();
        var webhooks = b.Webhooks;
        await webhooks.CreateAsync(Webhook("wh-all"));
        await webhooks.EnqueueAsync(Health("site-a"), T0);
        var message = (await webhooks.DueAsync(T0, T0, 10))[0].Delivery.MessageId;

        Assert.True(await webhooks.DeleteAsync("wh-all"));

        Assert.Empty(await webhooks.DueAsync(T0.AddDays(1), T0.AddDays(1), 10));
        Assert.False(await webhooks.RecordAttemptAsync(message, new DeliveryAttempt(DeliveryStatus.Delivered, T0, null, 200, null)));
        Assert.False(await webhooks.DeleteAsync("wh-all"));
    }

    [Fact]
    public async Task AlertChangeAndItsEventsAreWrittenTogether()
    {
        var b = await OpenAsync();
        var webhooks = b.Webhooks;
        var alerts = b.Alerts;
        await webhooks.CreateAsync(Webhook("wh-all"));

        var key = await KeyOfAsync("site-a");
        Assert.True(await alerts.ApplyAsync(new SiteAlertChange("site-a", key, [Raised("site-a")], [], "ok",
            [new OutgoingEvent("risk", "risk.raised", "site-a", "{}")]), T0));

        var state = await alerts.GetAsync("site-a");
        Assert.Equal("ok", state.HealthState);
        Assert.Equal(Raised("site-a"), Assert.Single(state.Raised));
        Assert.Equal("risk.raised", Assert.Single(await webhooks.DueAsync(T0, T0, 10)).Delivery.EventType);

        Assert.True(await alerts.ApplyAsync(new SiteAlertChange("site-a", key, [], [("frost", "night")], null, []), T0.AddHours(1)));
        Assert.Empty((await alerts.GetAsync("site-a")).Raised);
        Assert.Equal("ok", (await alerts.GetAsync("site-a")).HealthState);
    }

    [Fact]
    public async Task AChangeForADeletedSiteIsNotApplied()
    {
        var b = await OpenAsync();
        var webhooks = b.Webhooks;
        var alerts = b.Alerts;
        await webhooks.CreateAsync(Webhook("wh-all"));

        var key = await KeyOfAsync("site-a");
        Assert.False(await alerts.ApplyAsync(new SiteAlertChange("gone", key, [Raised("gone")], [], "ok", [Health("gone")]), T0));

        // An evaluation of site-a that ends after site-a was deleted and created again belongs to the old site.
        Assert.True(await b.Sites.DeleteAsync("site-a"));
        Assert.True(await b.Sites.CreateAsync(Site("site-a")));
        Assert.False(await alerts.ApplyAsync(new SiteAlertChange("site-a", key, [Raised("site-a")], [], "ok", [Health("site-a")]), T0));

        Assert.Empty(await webhooks.DueAsync(T0, T0, 10));
        Assert.Empty(await alerts.ListRaisedAsync(null, 10));
        Assert.Equal(new SiteAlertState([], null), await alerts.GetAsync("site-a") with { Raised = [] });
    }

    [Fact]
    public async Task DeletingASiteCancelsItsPendingDeliveriesAndForgetsItsAlerts()
    {
        var b = await OpenAsync();
        var webhooks = b.Webhooks;
        var alerts = b.Alerts;
        var sites = b.Sites;
        await webhooks.CreateAsync(Webhook("wh-all"));
        await alerts.ApplyAsync(new SiteAlertChange("site-a", await KeyOfAsync("site-a"), [Raised("site-a")], [], "ok", [Health("site-a")]), T0);
        await alerts.ApplyAsync(new SiteAlertChange("site-b", await KeyOfAsync("site-b"), [Raised("site-b")], [], "ok", [Health("site-b")]), T0);

        Assert.True(await sites.DeleteAsync("site-a"));

        var log = await webhooks.ListDeliveriesAsync("wh-all", null, 10);
        Assert.Equal(DeliveryStatus.Cancelled, log.Single(d => d.SiteId == "site-a").Status);
        Assert.Equal(DeliveryStatus.Pending, log.Single(d => d.SiteId == "site-b").Status);
        Assert.Equal(new SiteAlertState([], null), await alerts.GetAsync("site-a") with { Raised = [] });
        Assert.Equal(["site-b"], (await alerts.ListRaisedAsync(null, 10)).Select(a => a.SiteId));
    }

    [Fact]
    public async Task RaisedAlertsArePagedAcrossTheFleet()
    {
        var b = await OpenAsync();
        var alerts = b.Alerts;
        await alerts.ApplyAsync(new SiteAlertChange("site-a", await KeyOfAsync("site-a"), [Raised("site-a", "next24h"), Raised("site-a", "night")], [], null, []), T0);
        await alerts.ApplyAsync(new SiteAlertChange("site-b", await KeyOfAsync("site-b"), [Raised("site-b")], [], null, []), T0);

        var first = await alerts.ListRaisedAsync(null, 2);
        var rest = await alerts.ListRaisedAsync((first[^1].SiteId, first[^1].ThresholdId, first[^1].WindowName), 2);

        Assert.Equal(["site-a/next24h", "site-a/night", "site-b/night"], first.Concat(rest).Select(a => $"{a.SiteId}/{a.WindowName}"));
    }
}
