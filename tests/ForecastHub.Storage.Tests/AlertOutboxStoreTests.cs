using ForecastHub.Storage.Alerts;
using ForecastHub.Storage.Webhooks;

using ForecastHub.Storage.Postgres.Alerts;
using ForecastHub.Storage.Postgres.Webhooks;
using ForecastHub.Storage.Tests.Postgres;

namespace ForecastHub.Storage.Tests;

/// <summary>The webhook outbox and the alert state shared by several nodes on one PostgreSQL database
/// (what both backends do is in <c>WebhookAndAlertStoreContract</c>).</summary>
public sealed class AlertOutboxStoreTests
{
    private static readonly DateTimeOffset T0 = new(2026, 10, 20, 16, 0, 0, TimeSpan.Zero);

    private static WebhookRecord Webhook(string id) =>
        new(id, $"https://hooks.example.org/{id}", "whsec_" + Convert.ToBase64String(new byte[32]), [], ["risk", "health"], T0);

    private static OutgoingEvent Health(string siteId) => new("health", "health.changed", siteId, $$"""{"siteId":"{{siteId}}"}""");

    private static async Task<Backend> Open(string backend)
    {
        var b = await Backend.CreateAsync(backend);
        await b.Sites.CreateAsync(SiteStoreTests.Site("site-a"));
        await b.Sites.CreateAsync(SiteStoreTests.Site("site-b"));
        return b;
    }

    [Fact]
    public async Task ADueDeliveryIsClaimedByOneNodeUntilTheClaimRunsOut()
    {
        await using var b = await Open("postgres");
        var otherNode = new PostgresWebhookStore(b.Postgres!);
        await b.Webhooks.CreateAsync(Webhook("wh-all"));
        for (var i = 0; i < 40; i++)
        {
            await b.Webhooks.EnqueueAsync(Health("site-a"), T0);
        }

        var claimUntil = T0.AddSeconds(90);
        var both = await Task.WhenAll(Enumerable.Range(0, 4).Select(i =>
            (i % 2 == 0 ? b.Webhooks : otherNode).DueAsync(T0.AddSeconds(1), claimUntil, 15)));
        var handedOut = both.SelectMany(d => d).Select(d => d.Delivery.MessageId).ToList();
        Assert.Equal(40, handedOut.Count);
        Assert.Equal(40, handedOut.Distinct().Count());
        Assert.Empty(await otherNode.DueAsync(T0.AddSeconds(89), T0.AddSeconds(179), 50));

        // The claiming node died without recording an attempt: once the claim runs out, the deliveries are due again, with the same ids.
        var again = await otherNode.DueAsync(claimUntil, claimUntil.AddSeconds(90), 50);
        Assert.Equal(handedOut.Order(StringComparer.Ordinal), again.Select(d => d.Delivery.MessageId).Order(StringComparer.Ordinal));
        Assert.All(again, d => Assert.Equal(0, d.Delivery.Attempts));
    }

    [Fact]
    public async Task ASecondNodeWaitsForTheSiteLockUntilTheFirstHasApplied()
    {
        await using var b = await Open("postgres");
        var otherNode = new PostgresAlertStore(b.Postgres!);
        var first = await b.Alerts.LockAsync("site-a");
        var second = otherNode.LockAsync("site-a");
        await using (await otherNode.LockAsync("site-b"))
        {
            // Another site's lock is independent.
        }

        await Task.Delay(200);
        Assert.False(second.IsCompleted);
        await first.DisposeAsync();
        await using var held = await second.WaitAsync(TimeSpan.FromSeconds(30));
    }
}
