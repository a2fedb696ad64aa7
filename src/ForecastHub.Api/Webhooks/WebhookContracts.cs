using ForecastHub.Storage.Webhooks;

namespace ForecastHub.Api.Webhooks;

/// <summary>Body of <c>POST /api/v1/webhooks</c>. <c>siteIds</c> left out or empty: every site;
/// <c>events</c> left out: both <c>risk</c> and <c>health</c>.</summary>
public sealed record WebhookBody(string? Url, IReadOnlyList<string>? SiteIds, IReadOnlyList<string>? Events);

/// <summary>The answer to creating a webhook: the only time its signing <c>secret</c> is shown.</summary>
public sealed record CreatedWebhookResponse(string Id, string Url, IReadOnlyList<string> SiteIds, IReadOnlyList<string> Events, string Secret, DateTimeOffset CreatedAt);

/// <summary>A webhook as listed: never its secret.</summary>
public sealed record WebhookResponse(string Id, string Url, IReadOnlyList<string> SiteIds, IReadOnlyList<string> Events, DateTimeOffset CreatedAt)
{
    public static WebhookResponse From(WebhookRecord webhook)
    {
        ArgumentNullException.ThrowIfNull(webhook);
        return new(webhook.Id, webhook.Url, webhook.SiteIds, webhook.Events, webhook.CreatedAt);
    }
}

/// <summary>One page of webhooks; <c>next</c> is the link to the following page, null on the last.</summary>
public sealed record WebhookList(IReadOnlyList<WebhookResponse> Webhooks, string? Next);

/// <summary>One event for one webhook: <c>status</c> pending, delivered, failed (given up) or cancelled (its site was deleted).</summary>
public sealed record DeliveryResponse(
    string Id,
    string Event,
    string? SiteId,
    string Status,
    int Attempts,
    DateTimeOffset CreatedAt,
    DateTimeOffset? LastAttemptAt,
    DateTimeOffset? NextAttemptAt,
    int? LastStatusCode,
    string? LastError)
{
    public static DeliveryResponse From(DeliveryRecord delivery)
    {
        ArgumentNullException.ThrowIfNull(delivery);
        return new(delivery.MessageId, delivery.EventType, delivery.SiteId, delivery.Status, delivery.Attempts, delivery.CreatedAt,
            delivery.LastAttemptAt, delivery.NextAttemptAt, delivery.LastStatusCode, delivery.LastError);
    }
}

/// <summary>One page of a webhook's deliveries, newest first; <c>next</c> links to older ones.</summary>
public sealed record DeliveryList(IReadOnlyList<DeliveryResponse> Deliveries, string? Next);

/// <summary>Event families a webhook subscribes to, and the event types in each.</summary>
public static class WebhookEvents
{
    public const string Risk = "risk";
    public const string Health = "health";
    public const string RiskRaised = "risk.raised";
    public const string RiskCleared = "risk.cleared";
    public const string HealthChanged = "health.changed";

    public static IReadOnlyList<string> Families { get; } = [Risk, Health];
}
