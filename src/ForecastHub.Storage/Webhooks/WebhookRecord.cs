namespace ForecastHub.Storage.Webhooks;

/// <summary>A webhook subscription. <paramref name="SiteIds"/> empty means every site;
/// <paramref name="Events"/> holds event families (<c>risk</c>, <c>health</c>).
/// <paramref name="Secret"/> is the signing secret as issued (<c>whsec_</c> + base64).</summary>
public sealed record WebhookRecord(
    string Id,
    string Url,
    string Secret,
    IReadOnlyList<string> SiteIds,
    IReadOnlyList<string> Events,
    DateTimeOffset CreatedAt)
{
    public bool Covers(string family, string? siteId) =>
        Events.Contains(family, StringComparer.Ordinal)
        && (SiteIds.Count == 0 || (siteId is not null && SiteIds.Contains(siteId, StringComparer.Ordinal)));
}

/// <summary>Delivery states: waiting for its next attempt, answered with 2xx, given up, or
/// cancelled (its site was deleted).</summary>
public static class DeliveryStatus
{
    public const string Pending = "pending";
    public const string Delivered = "delivered";
    public const string Failed = "failed";
    public const string Cancelled = "cancelled";
}

/// <summary>One event for one webhook, as the outbox keeps it. <paramref name="Seq"/> orders the log.</summary>
public sealed record DeliveryRecord(
    long Seq,
    string MessageId,
    string WebhookId,
    string EventType,
    string? SiteId,
    string Body,
    string Status,
    int Attempts,
    DateTimeOffset CreatedAt,
    DateTimeOffset? NextAttemptAt,
    DateTimeOffset? LastAttemptAt,
    int? LastStatusCode,
    string? LastError);

/// <summary>A delivery due now, with what the sender needs: the address and the signing secret.</summary>
public sealed record DueDelivery(DeliveryRecord Delivery, string Url, string Secret);

/// <summary>The outcome of one attempt: <paramref name="Status"/> is pending (retry at
/// <paramref name="NextAttemptAt"/>), delivered or failed.</summary>
public sealed record DeliveryAttempt(
    string Status,
    DateTimeOffset AttemptedAt,
    DateTimeOffset? NextAttemptAt,
    int? StatusCode,
    string? Error);

/// <summary>An event to send to every webhook that covers its family and site.</summary>
public sealed record OutgoingEvent(string Family, string EventType, string? SiteId, string Body);
