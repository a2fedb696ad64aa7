namespace ForecastHub.Storage.Webhooks;

/// <summary>Webhook subscriptions and their delivery outbox. Every delivery is stored before it is
/// attempted, and each attempt's outcome is stored before the next, so a restart (or a killed
/// process) resumes the pending ones.</summary>
public interface IWebhookStore
{
    /// <summary>Stores a new webhook; false when its id is taken.</summary>
    Task<bool> CreateAsync(WebhookRecord webhook, CancellationToken cancellationToken = default);

    Task<WebhookRecord?> GetAsync(string id, CancellationToken cancellationToken = default);

    /// <summary>Webhooks ordered by id, starting after <paramref name="afterId"/> (exclusive).</summary>
    Task<IReadOnlyList<WebhookRecord>> ListAsync(string? afterId, int limit, CancellationToken cancellationToken = default);

    /// <summary>Removes the webhook with its delivery log, so nothing pending for it is sent again; false when it does not exist.</summary>
    Task<bool> DeleteAsync(string id, CancellationToken cancellationToken = default);

    /// <summary>Adds one pending delivery, due at <paramref name="at"/>, per webhook that covers the event; answers how many.</summary>
    Task<int> EnqueueAsync(OutgoingEvent outgoing, DateTimeOffset at, CancellationToken cancellationToken = default);

    /// <summary>Pending deliveries due at or before <paramref name="now"/>, oldest first, claimed until
    /// <paramref name="claimUntil"/>: where several processes share the storage, none of them is
    /// handed these again before then (unless an attempt is recorded), so each is sent by one.</summary>
    Task<IReadOnlyList<DueDelivery>> DueAsync(DateTimeOffset now, DateTimeOffset claimUntil, int limit, CancellationToken cancellationToken = default);

    /// <summary>When the earliest pending delivery is due; null when none is pending.</summary>
    Task<DateTimeOffset?> NextDueAsync(CancellationToken cancellationToken = default);

    /// <summary>Stores an attempt's outcome and counts it; false when the delivery is no longer pending (cancelled or deleted meanwhile).</summary>
    Task<bool> RecordAttemptAsync(string messageId, DeliveryAttempt attempt, CancellationToken cancellationToken = default);

    /// <summary>A webhook's deliveries, newest first, those before <paramref name="beforeSeq"/> (exclusive) when given.</summary>
    Task<IReadOnlyList<DeliveryRecord>> ListDeliveriesAsync(string webhookId, long? beforeSeq, int limit, CancellationToken cancellationToken = default);
}
