using System.Data.Common;
using System.Security.Cryptography;
using System.Text.Json;

namespace ForecastHub.Storage.Webhooks;

/// <summary>The webhook and outbox rows as every backend reads them (same columns, same order), and the message ids they carry.</summary>
public static class WebhookRows
{
    public const string WebhookColumns = "id, url, secret, site_ids, events, created_at_ms";

    public const string DeliveryColumns = """
        d.seq, d.message_id, d.webhook_id, d.event_type, d.site_id, d.body, d.status, d.attempts, d.created_at_ms,
        d.next_attempt_at_ms, d.last_attempt_at_ms, d.last_status_code, d.last_error
        """;

    /// <summary>Standard Webhooks message ids: unique per message, the same on every retry of it.</summary>
    public static string NewMessageId() => "msg_" + Convert.ToHexStringLower(RandomNumberGenerator.GetBytes(16));

    /// <summary>A row of <see cref="WebhookColumns"/>.</summary>
    public static WebhookRecord Webhook(DbDataReader reader)
    {
        ArgumentNullException.ThrowIfNull(reader);
        return new(
            reader.GetString(0),
            reader.GetString(1),
            reader.GetString(2),
            JsonSerializer.Deserialize<string[]>(reader.GetString(3)) ?? [],
            JsonSerializer.Deserialize<string[]>(reader.GetString(4)) ?? [],
            DateTimeOffset.FromUnixTimeMilliseconds(reader.GetInt64(5)));
    }

    /// <summary>A row of <see cref="DeliveryColumns"/>.</summary>
    public static DeliveryRecord Delivery(DbDataReader reader)
    {
        ArgumentNullException.ThrowIfNull(reader);
        return new(
            reader.GetInt64(0),
            reader.GetString(1),
            reader.GetString(2),
            reader.GetString(3),
            reader.IsDBNull(4) ? null : reader.GetString(4),
            reader.GetString(5),
            reader.GetString(6),
            reader.GetInt32(7),
            DateTimeOffset.FromUnixTimeMilliseconds(reader.GetInt64(8)),
            reader.IsDBNull(9) ? null : DateTimeOffset.FromUnixTimeMilliseconds(reader.GetInt64(9)),
            reader.IsDBNull(10) ? null : DateTimeOffset.FromUnixTimeMilliseconds(reader.GetInt64(10)),
            reader.IsDBNull(11) ? null : reader.GetInt32(11),
            reader.IsDBNull(12) ? null : reader.GetString(12));
    }
}
