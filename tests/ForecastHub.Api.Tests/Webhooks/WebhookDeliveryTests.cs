using System.Globalization;
using System.Net;
using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;
using ForecastHub.Storage.Webhooks;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Webhooks;

/// <summary>Deliveries to a real receiver on loopback, with the fake clock driving the retries.</summary>
public sealed class WebhookDeliveryTests
{
    private static readonly TimeSpan Patience = ModelScenario.Patience;

    [Fact]
    public async Task HealthChangeIsDeliveredSignedPerStandardWebhooks()
    {
        await using var receiver = await WebhookReceiver.StartAsync();
        await using var factory = WebhookScenario.Factory();
        using var admin = factory.CreateAdminClient();
        var (id, secret) = await admin.CreateWebhookAsync(receiver.Url);
        var recorded = factory.Deliveries().WhenAttemptRecordedAsync();

        await factory.MakeSiteSensorSuspectAsync(admin, "orchard-1");
        var delivery = await receiver.NextAsync(Patience);
        await recorded.WaitAsync(Patience);

        Assert.True(delivery.SignatureValidFor(secret), $"signature {delivery.Signature} does not verify");
        Assert.False(delivery.SignatureValidFor(WebhookSecretsForTests.Other), "a different secret must not verify");
        Assert.Matches("^msg_[0-9a-f]{32}$", delivery.Id);
        Assert.Equal(factory.Clock.GetUtcNow().ToUnixTimeSeconds().ToString(CultureInfo.InvariantCulture), delivery.Timestamp);
        using var body = JsonDocument.Parse(delivery.Body);
        var root = body.RootElement;
        Assert.Equal("health.changed", root.GetProperty("type").GetString());
        var data = root.GetProperty("data");
        Assert.Equal("orchard-1", data.GetProperty("siteId").GetString());
        Assert.Equal("stale", data.GetProperty("previous").GetString());
        Assert.Equal("sensor-suspect", data.GetProperty("state").GetString());
        Assert.Contains(data.GetProperty("reasons").EnumerateArray(), r => r.GetProperty("code").GetString() == "flat-line");
        Assert.Equal(2, data.GetProperty("cautions").GetArrayLength());

        var attempts = Assert.Single(await admin.DeliveriesAsync(id));
        Assert.Equal("delivered", attempts.GetProperty("status").GetString());
        Assert.Equal(1, attempts.GetProperty("attempts").GetInt32());
        Assert.Equal(delivery.Id, attempts.GetProperty("id").GetString());
        Assert.Equal("health.changed", attempts.GetProperty("event").GetString());
    }

    [Fact]
    public async Task AFailedDeliveryIsRetriedAfterTheBackoffWithTheSameId()
    {
        await using var receiver = await WebhookReceiver.StartAsync();
        receiver.AnswerWith = 500;
        await using var factory = WebhookScenario.Factory();
        using var admin = factory.CreateAdminClient();
        var (id, secret) = await admin.CreateWebhookAsync(receiver.Url);
        var recorded = factory.Deliveries().WhenAttemptRecordedAsync();

        await factory.MakeSiteSensorSuspectAsync(admin, "orchard-1");
        var failed = await receiver.NextAsync(Patience);
        await recorded.WaitAsync(Patience);

        var pending = Assert.Single(await admin.DeliveriesAsync(id));
        Assert.Equal("pending", pending.GetProperty("status").GetString());
        Assert.Equal(1, pending.GetProperty("attempts").GetInt32());
        Assert.Equal(500, pending.GetProperty("lastStatusCode").GetInt32());
        Assert.Contains("500", pending.GetProperty("lastError").GetString(), StringComparison.Ordinal);
        Assert.Equal(factory.Clock.GetUtcNow().AddMinutes(1), pending.GetProperty("nextAttemptAt").GetDateTimeOffset());

        receiver.AnswerWith = 200;
        recorded = factory.Deliveries().WhenAttemptRecordedAsync();
        factory.Clock.Advance(TimeSpan.FromMinutes(1));
        var retried = await receiver.NextAsync(Patience);
        await recorded.WaitAsync(Patience);

        Assert.Equal(failed.Id, retried.Id);
        Assert.Equal(failed.Body, retried.Body);
        Assert.True(retried.SignatureValidFor(secret));
        Assert.NotEqual(failed.Timestamp, retried.Timestamp);
        var delivered = Assert.Single(await admin.DeliveriesAsync(id));
        Assert.Equal("delivered", delivered.GetProperty("status").GetString());
        Assert.Equal(2, delivered.GetProperty("attempts").GetInt32());
    }

    [Fact]
    public async Task ADeliveryStillFailingAfterTwentyFourHoursIsGivenUpAndMarked()
    {
        await using var receiver = await WebhookReceiver.StartAsync();
        receiver.AnswerWith = 503;
        await using var factory = WebhookScenario.Factory();
        using var admin = factory.CreateAdminClient();
        var (id, _) = await admin.CreateWebhookAsync(receiver.Url);
        var recorded = factory.Deliveries().WhenAttemptRecordedAsync();
        await factory.MakeSiteSensorSuspectAsync(admin, "orchard-1");
        var queuedAt = factory.Clock.GetUtcNow();

        for (var attempt = 1; ; attempt++)
        {
            await receiver.NextAsync(Patience);
            await recorded.WaitAsync(Patience);
            var delivery = Assert.Single(await admin.DeliveriesAsync(id));
            Assert.Equal(attempt, delivery.GetProperty("attempts").GetInt32());
            if (delivery.GetProperty("status").GetString() == "failed")
            {
                Assert.Equal(queuedAt.AddHours(24), factory.Clock.GetUtcNow());
                Assert.Contains("Given up", delivery.GetProperty("lastError").GetString(), StringComparison.Ordinal);
                Assert.Equal(12, attempt);
                break;
            }
            recorded = factory.Deliveries().WhenAttemptRecordedAsync();
            factory.Clock.SetUtcNow(delivery.GetProperty("nextAttemptAt").GetDateTimeOffset());
        }

        Assert.Null(await factory.Services.GetRequiredService<IWebhookStore>().NextDueAsync());
    }

    [Fact]
    public async Task APendingDeliverySurvivesARestartAndIsSentByTheNextProcess()
    {
        await using var receiver = await WebhookReceiver.StartAsync();
        receiver.AnswerWith = 500;
        var path = TestFiles.NewDatabasePath();
        string webhookId;
        ReceivedDelivery failed;
        await using (var first = WebhookScenario.Factory(path, keepDatabase: true))
        {
            using var admin = first.CreateAdminClient();
            (webhookId, _) = await admin.CreateWebhookAsync(receiver.Url);
            var recorded = first.Deliveries().WhenAttemptRecordedAsync();
            await first.MakeSiteSensorSuspectAsync(admin, "orchard-1");
            failed = await receiver.NextAsync(Patience);
            await recorded.WaitAsync(Patience);
        }

        receiver.AnswerWith = 200;
        await using var second = WebhookScenario.Factory(path);
        using var again = second.CreateAdminClient();
        var retriedRecorded = second.Deliveries().WhenAttemptRecordedAsync();
        second.Clock.Advance(TimeSpan.FromMinutes(1));
        var retried = await receiver.NextAsync(Patience);
        await retriedRecorded.WaitAsync(Patience);

        Assert.Equal(failed.Id, retried.Id);
        var delivered = Assert.Single(await again.DeliveriesAsync(webhookId));
        Assert.Equal("delivered", delivered.GetProperty("status").GetString());
        Assert.Equal(2, delivered.GetProperty("attempts").GetInt32());
    }

    [Fact]
    public async Task WebhooksForOtherSitesOrOnlyRiskEventsGetNoHealthEvent()
    {
        await using var receiver = await WebhookReceiver.StartAsync();
        await using var factory = WebhookScenario.Factory();
        using var admin = factory.CreateAdminClient();
        var (otherSite, _) = await admin.CreateWebhookAsync(receiver.Url + "?which=other", new { siteIds = new[] { "orchard-9" } });
        var (riskOnly, _) = await admin.CreateWebhookAsync(receiver.Url + "?which=risk", new { events = new[] { "risk" } });
        var (thisSite, _) = await admin.CreateWebhookAsync(receiver.Url + "?which=this", new { siteIds = new[] { "orchard-1" }, events = new[] { "health" } });

        await factory.MakeSiteSensorSuspectAsync(admin, "orchard-1");
        await receiver.NextAsync(Patience);

        Assert.Single(await admin.DeliveriesAsync(thisSite));
        Assert.Empty(await admin.DeliveriesAsync(otherSite));
        Assert.Empty(await admin.DeliveriesAsync(riskOnly));
    }

    [Fact]
    public async Task DeletingTheSiteCancelsItsPendingDeliveries()
    {
        await using var receiver = await WebhookReceiver.StartAsync();
        receiver.AnswerWith = 500;
        await using var factory = WebhookScenario.Factory();
        using var admin = factory.CreateAdminClient();
        var (id, _) = await admin.CreateWebhookAsync(receiver.Url);
        var recorded = factory.Deliveries().WhenAttemptRecordedAsync();
        await factory.MakeSiteSensorSuspectAsync(admin, "orchard-1");
        await recorded.WaitAsync(Patience);

        using var deleted = await admin.DeleteAsync(new Uri("/api/v1/sites/orchard-1", UriKind.Relative));
        Assert.Equal(HttpStatusCode.NoContent, deleted.StatusCode);

        var cancelled = Assert.Single(await admin.DeliveriesAsync(id));
        Assert.Equal("cancelled", cancelled.GetProperty("status").GetString());
        Assert.Null(await factory.Services.GetRequiredService<IWebhookStore>().NextDueAsync());
    }

    [Fact]
    public async Task DeletingTheWebhookCancelsItsPendingDeliveries()
    {
        await using var receiver = await WebhookReceiver.StartAsync();
        receiver.AnswerWith = 500;
        await using var factory = WebhookScenario.Factory();
        using var admin = factory.CreateAdminClient();
        var (id, _) = await admin.CreateWebhookAsync(receiver.Url);
        var recorded = factory.Deliveries().WhenAttemptRecordedAsync();
        await factory.MakeSiteSensorSuspectAsync(admin, "orchard-1");
        await recorded.WaitAsync(Patience);

        using var deleted = await admin.DeleteAsync(new Uri($"/api/v1/webhooks/{id}", UriKind.Relative));

        Assert.Equal(HttpStatusCode.NoContent, deleted.StatusCode);
        Assert.Null(await factory.Services.GetRequiredService<IWebhookStore>().NextDueAsync());
    }
}

internal static class WebhookSecretsForTests
{
    public const string Other = "whsec_MfKQ9r8GKYqrTwjUPD8ILPZIo2LaLaSw";
}
