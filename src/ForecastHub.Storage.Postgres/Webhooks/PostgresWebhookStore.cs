using System.Text.Json;
using ForecastHub.Storage.Webhooks;
using Npgsql;

namespace ForecastHub.Storage.Postgres.Webhooks;

/// <summary>
/// Webhooks and the outbox shared by every node. <see cref="DueAsync"/> claims what it returns:
/// it moves each row's next attempt to the claim's end in the same statement (rows another node is
/// claiming are skipped), so two nodes never send one delivery at once, and a node that dies
/// mid-send leaves the delivery to be sent again, with the same message id, once the claim runs out.
/// </summary>
public sealed class PostgresWebhookStore(PostgresDatabase database) : IWebhookStore
{
    public Task<bool> CreateAsync(WebhookRecord webhook, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(webhook);
        return database.WriteAsync(async (connection, transaction) =>
        {
            await using var insert = connection.Command(transaction, $"""
                INSERT INTO webhooks ({WebhookRows.WebhookColumns}) VALUES ($1, $2, $3, $4, $5, $6) ON CONFLICT DO NOTHING;
                """)
                .With(webhook.Id)
                .With(webhook.Url)
                .With(webhook.Secret)
                .With(JsonSerializer.Serialize(webhook.SiteIds))
                .With(JsonSerializer.Serialize(webhook.Events))
                .With(webhook.CreatedAt.ToUnixTimeMilliseconds());
            return await insert.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false) == 1;
        }, cancellationToken);
    }

    public Task<WebhookRecord?> GetAsync(string id, CancellationToken cancellationToken = default) =>
        database.QueryAsync(async connection =>
        {
            await using var select = connection.Command(null, $"SELECT {WebhookRows.WebhookColumns} FROM webhooks WHERE id = $1;").With(id);
            return (await ReadAllAsync(select, WebhookRows.Webhook, cancellationToken).ConfigureAwait(false)).FirstOrDefault();
        }, cancellationToken);

    public Task<IReadOnlyList<WebhookRecord>> ListAsync(string? afterId, int limit, CancellationToken cancellationToken = default) =>
        database.QueryAsync<IReadOnlyList<WebhookRecord>>(async connection =>
        {
            await using var select = connection.Command(null, $"SELECT {WebhookRows.WebhookColumns} FROM webhooks WHERE id > $1 ORDER BY id LIMIT $2;")
                .With(afterId ?? "").With(limit);
            return await ReadAllAsync(select, WebhookRows.Webhook, cancellationToken).ConfigureAwait(false);
        }, cancellationToken);

    public Task<bool> DeleteAsync(string id, CancellationToken cancellationToken = default) =>
        database.WriteAsync(async (connection, transaction) =>
        {
            // Deliveries go with it (foreign key cascade): a pending one can no longer be recorded or sent.
            await using var delete = connection.Command(transaction, "DELETE FROM webhooks WHERE id = $1;").With(id);
            return await delete.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false) == 1;
        }, cancellationToken);

    public Task<int> EnqueueAsync(OutgoingEvent outgoing, DateTimeOffset at, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(outgoing);
        return database.WriteAsync((connection, transaction) => EnqueueAsync(connection, transaction, outgoing, at, cancellationToken), cancellationToken);
    }

    /// <summary>Queues the event for every covering webhook inside the caller's transaction.</summary>
    internal static async Task<int> EnqueueAsync(NpgsqlConnection connection, NpgsqlTransaction transaction, OutgoingEvent outgoing, DateTimeOffset at,
        CancellationToken cancellationToken)
    {
        List<WebhookRecord> webhooks;
        await using (var select = connection.Command(transaction, $"SELECT {WebhookRows.WebhookColumns} FROM webhooks ORDER BY id;"))
        {
            webhooks = await ReadAllAsync(select, WebhookRows.Webhook, cancellationToken).ConfigureAwait(false);
        }

        var queued = 0;
        foreach (var webhook in webhooks.Where(w => w.Covers(outgoing.Family, outgoing.SiteId)))
        {
            await using var insert = connection.Command(transaction, """
                INSERT INTO webhook_deliveries (message_id, webhook_id, event_type, site_id, body, status, attempts, created_at_ms, next_attempt_at_ms)
                VALUES ($1, $2, $3, $4, $5, 'pending', 0, $6, $6);
                """)
                .With(WebhookRows.NewMessageId())
                .With(webhook.Id)
                .With(outgoing.EventType)
                .With(outgoing.SiteId)
                .With(outgoing.Body)
                .With(at.ToUnixTimeMilliseconds());
            queued += await insert.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
        }

        return queued;
    }

    public Task<IReadOnlyList<DueDelivery>> DueAsync(DateTimeOffset now, DateTimeOffset claimUntil, int limit, CancellationToken cancellationToken = default) =>
        database.WriteAsync<IReadOnlyList<DueDelivery>>(async (connection, transaction) =>
        {
            // Every part of one statement reads the same snapshot, so the final SELECT sees the rows as they were before the claim.
            await using var claim = connection.Command(transaction, $"""
                WITH due AS (
                    SELECT seq FROM webhook_deliveries
                    WHERE status = 'pending' AND next_attempt_at_ms <= $1
                    ORDER BY next_attempt_at_ms, seq LIMIT $2
                    FOR UPDATE SKIP LOCKED),
                claimed AS (
                    UPDATE webhook_deliveries d SET next_attempt_at_ms = $3 FROM due WHERE d.seq = due.seq RETURNING d.seq)
                SELECT {WebhookRows.DeliveryColumns}, w.url, w.secret
                FROM claimed c JOIN webhook_deliveries d ON d.seq = c.seq JOIN webhooks w ON w.id = d.webhook_id
                ORDER BY d.next_attempt_at_ms, d.seq;
                """)
                .With(now.ToUnixTimeMilliseconds())
                .With(limit)
                .With(claimUntil.ToUnixTimeMilliseconds());
            return await ReadAllAsync(claim, r => new DueDelivery(WebhookRows.Delivery(r), r.GetString(13), r.GetString(14)), cancellationToken)
                .ConfigureAwait(false);
        }, cancellationToken);

    public Task<DateTimeOffset?> NextDueAsync(CancellationToken cancellationToken = default) =>
        database.QueryAsync(async connection =>
        {
            await using var select = connection.Command(null, "SELECT min(next_attempt_at_ms) FROM webhook_deliveries WHERE status = 'pending';");
            return await select.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false) is long ms
                ? NpgsqlExtensions.FromUnixMs(ms)
                : (DateTimeOffset?)null;
        }, cancellationToken);

    public Task<bool> RecordAttemptAsync(string messageId, DeliveryAttempt attempt, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(attempt);
        return database.WriteAsync(async (connection, transaction) =>
        {
            await using var update = connection.Command(transaction, """
                UPDATE webhook_deliveries
                SET status = $2, attempts = attempts + 1, last_attempt_at_ms = $3, next_attempt_at_ms = $4,
                    last_status_code = $5, last_error = $6
                WHERE message_id = $1 AND status = 'pending';
                """)
                .With(messageId)
                .With(attempt.Status)
                .With(attempt.AttemptedAt.ToUnixTimeMilliseconds())
                .With<long?>(attempt.NextAttemptAt?.ToUnixTimeMilliseconds(), NpgsqlTypes.NpgsqlDbType.Bigint)
                .With<int?>(attempt.StatusCode, NpgsqlTypes.NpgsqlDbType.Integer)
                .With<string?>(attempt.Error, NpgsqlTypes.NpgsqlDbType.Text);
            return await update.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false) == 1;
        }, cancellationToken);
    }

    public Task<IReadOnlyList<DeliveryRecord>> ListDeliveriesAsync(string webhookId, long? beforeSeq, int limit, CancellationToken cancellationToken = default) =>
        database.QueryAsync<IReadOnlyList<DeliveryRecord>>(async connection =>
        {
            await using var select = connection.Command(null, $"""
                SELECT {WebhookRows.DeliveryColumns} FROM webhook_deliveries d
                WHERE d.webhook_id = $1 AND d.seq < $2 ORDER BY d.seq DESC LIMIT $3;
                """)
                .With(webhookId).With(beforeSeq ?? long.MaxValue).With(limit);
            return await ReadAllAsync(select, WebhookRows.Delivery, cancellationToken).ConfigureAwait(false);
        }, cancellationToken);

    private static async Task<List<T>> ReadAllAsync<T>(NpgsqlCommand select, Func<NpgsqlDataReader, T> read, CancellationToken cancellationToken)
    {
        await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
        var rows = new List<T>();
        while (await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
        {
            rows.Add(read(reader));
        }

        return rows;
    }
}
