using System.Text.Json;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage.Webhooks;

public sealed class SqliteWebhookStore(SqliteDatabase database) : IWebhookStore
{
    public Task<bool> CreateAsync(WebhookRecord webhook, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(webhook);
        return database.WriteAsync((connection, transaction) =>
        {
            using var insert = connection.Command(transaction, $"""
                    INSERT INTO webhooks ({WebhookRows.WebhookColumns}) VALUES ($id, $url, $secret, $sites, $events, $created)
                    ON CONFLICT DO NOTHING;
                    """)
                .With("$id", webhook.Id)
                .With("$url", webhook.Url)
                .With("$secret", webhook.Secret)
                .With("$sites", JsonSerializer.Serialize(webhook.SiteIds))
                .With("$events", JsonSerializer.Serialize(webhook.Events))
                .With("$created", webhook.CreatedAt.ToUnixTimeMilliseconds());
            return insert.ExecuteNonQuery() == 1;
        }, cancellationToken);
    }

    public Task<WebhookRecord?> GetAsync(string id, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read((connection, transaction) =>
        {
            using var select = connection.Command(transaction, $"SELECT {WebhookRows.WebhookColumns} FROM webhooks WHERE id = $id;").With("$id", id);
            using var reader = select.ExecuteReader();
            return reader.Read() ? WebhookRows.Webhook(reader) : null;
        }));

    public Task<IReadOnlyList<WebhookRecord>> ListAsync(string? afterId, int limit, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read<IReadOnlyList<WebhookRecord>>((connection, transaction) =>
        {
            using var select = connection.Command(transaction, $"SELECT {WebhookRows.WebhookColumns} FROM webhooks WHERE id > $after ORDER BY id LIMIT $limit;")
                .With("$after", afterId ?? "")
                .With("$limit", limit);
            return ReadAll(select, WebhookRows.Webhook);
        }));

    public Task<bool> DeleteAsync(string id, CancellationToken cancellationToken = default) =>
        database.WriteAsync((connection, transaction) =>
        {
            // Deliveries go with it (foreign key cascade): a pending one can no longer be recorded or sent.
            using var delete = connection.Command(transaction, "DELETE FROM webhooks WHERE id = $id;").With("$id", id);
            return delete.ExecuteNonQuery() == 1;
        }, cancellationToken);

    public Task<int> EnqueueAsync(OutgoingEvent outgoing, DateTimeOffset at, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(outgoing);
        return database.WriteAsync((connection, transaction) => Enqueue(connection, transaction, outgoing, at), cancellationToken);
    }

    /// <summary>Queues the event for every covering webhook inside the caller's transaction.</summary>
    internal static int Enqueue(SqliteConnection connection, SqliteTransaction transaction, OutgoingEvent outgoing, DateTimeOffset at)
    {
        List<WebhookRecord> webhooks;
        using (var select = connection.Command(transaction, $"SELECT {WebhookRows.WebhookColumns} FROM webhooks ORDER BY id;"))
        {
            webhooks = ReadAll(select, WebhookRows.Webhook);
        }

        var queued = 0;
        foreach (var webhook in webhooks.Where(w => w.Covers(outgoing.Family, outgoing.SiteId)))
        {
            using var insert = connection.Command(transaction, """
                    INSERT INTO webhook_deliveries (message_id, webhook_id, event_type, site_id, body, status, attempts, created_at_ms, next_attempt_at_ms)
                    VALUES ($message, $webhook, $type, $site, $body, 'pending', 0, $at, $at);
                    """)
                .With("$message", WebhookRows.NewMessageId())
                .With("$webhook", webhook.Id)
                .With("$type", outgoing.EventType)
                .With("$site", outgoing.SiteId)
                .With("$body", outgoing.Body)
                .With("$at", at.ToUnixTimeMilliseconds());
            queued += insert.ExecuteNonQuery();
        }

        return queued;
    }

    /// <summary>No claim is written: a SQLite file has one service process, whose worker never asks again while it sends,
    /// and after a crash what was in flight is due at once.</summary>
    public Task<IReadOnlyList<DueDelivery>> DueAsync(DateTimeOffset now, DateTimeOffset claimUntil, int limit, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read<IReadOnlyList<DueDelivery>>((connection, transaction) =>
        {
            using var select = connection.Command(transaction, $"""
                    SELECT {WebhookRows.DeliveryColumns}, w.url, w.secret
                    FROM webhook_deliveries d JOIN webhooks w ON w.id = d.webhook_id
                    WHERE d.status = 'pending' AND d.next_attempt_at_ms <= $now
                    ORDER BY d.next_attempt_at_ms, d.seq LIMIT $limit;
                    """)
                .With("$now", now.ToUnixTimeMilliseconds())
                .With("$limit", limit);
            return ReadAll(select, r => new DueDelivery(WebhookRows.Delivery(r), r.GetString(13), r.GetString(14)));
        }));

    public Task<DateTimeOffset?> NextDueAsync(CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read((connection, transaction) =>
        {
            using var select = connection.Command(transaction,
                "SELECT min(next_attempt_at_ms) FROM webhook_deliveries WHERE status = 'pending';");
            return select.ExecuteScalar() is long ms ? SqliteExtensions.FromUnixMs(ms) : (DateTimeOffset?)null;
        }));

    public Task<bool> RecordAttemptAsync(string messageId, DeliveryAttempt attempt, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(attempt);
        return database.WriteAsync((connection, transaction) =>
        {
            using var update = connection.Command(transaction, """
                    UPDATE webhook_deliveries
                    SET status = $status, attempts = attempts + 1, last_attempt_at_ms = $at, next_attempt_at_ms = $next,
                        last_status_code = $code, last_error = $error
                    WHERE message_id = $message AND status = 'pending';
                    """)
                .With("$message", messageId)
                .With("$status", attempt.Status)
                .With("$at", attempt.AttemptedAt.ToUnixTimeMilliseconds())
                .With("$next", attempt.NextAttemptAt?.ToUnixTimeMilliseconds())
                .With("$code", attempt.StatusCode)
                .With("$error", attempt.Error);
            return update.ExecuteNonQuery() == 1;
        }, cancellationToken);
    }

    public Task<IReadOnlyList<DeliveryRecord>> ListDeliveriesAsync(string webhookId, long? beforeSeq, int limit, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read<IReadOnlyList<DeliveryRecord>>((connection, transaction) =>
        {
            using var select = connection.Command(transaction, $"""
                    SELECT {WebhookRows.DeliveryColumns} FROM webhook_deliveries d
                    WHERE d.webhook_id = $webhook AND d.seq < $before ORDER BY d.seq DESC LIMIT $limit;
                    """)
                .With("$webhook", webhookId)
                .With("$before", beforeSeq ?? long.MaxValue)
                .With("$limit", limit);
            return ReadAll(select, WebhookRows.Delivery);
        }));

    private static List<T> ReadAll<T>(SqliteCommand select, Func<SqliteDataReader, T> read)
    {
        using var reader = select.ExecuteReader();
        var rows = new List<T>();
        while (reader.Read())
        {
            rows.Add(read(reader));
        }

        return rows;
    }
}
