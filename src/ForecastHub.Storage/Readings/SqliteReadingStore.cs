using ForecastHub.Core.Quality;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage.Readings;

public sealed class SqliteReadingStore(SqliteDatabase database) : IReadingStore
{
    private const string ReadingColumns = "time_ms, value_c, original_value, original_unit, flags";

    public Task<IngestResult?> IngestAsync(string siteId, IReadOnlyList<IncomingReading> readings, ConflictPolicy policy,
        DateTimeOffset receivedAt, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(readings);
        return database.WriteAsync<IngestResult?>((connection, transaction) =>
        {
            var site = FindSite(connection, transaction, siteId);
            if (site is null)
            {
                return null;
            }
            var (siteKey, limits) = site.Value;
            if (readings.Count == 0)
            {
                return new IngestResult([]);
            }
            var stored = LoadNeighbourhood(connection, transaction, siteKey, readings, limits.FlatlineHours);
            var plan = IngestPlanner.Plan(stored, readings, policy, limits);
            Insert(connection, transaction, siteKey, plan.Inserts, receivedAt.ToUnixTimeMilliseconds());
            Update(connection, transaction, siteKey, plan.Updates, receivedAt.ToUnixTimeMilliseconds());
            return new IngestResult(plan.Outcomes);
        }, cancellationToken);
    }

    public Task<IReadOnlyList<StoredReading>?> ReadAsync(string siteId, long fromMs, long toMs, long? afterMs, int limit,
        CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read<IReadOnlyList<StoredReading>?>((connection, transaction) =>
        {
            var site = FindSite(connection, transaction, siteId);
            if (site is null)
            {
                return null;
            }
            var start = afterMs is { } after && after >= fromMs ? after + 1 : fromMs;
            using var select = connection.Command(transaction, $"""
                    SELECT {ReadingColumns} FROM readings
                    WHERE site_key = $site AND time_ms >= $from AND time_ms < $to
                    ORDER BY time_ms LIMIT $limit;
                    """)
                .With("$site", site.Value.Key)
                .With("$from", start)
                .With("$to", toMs)
                .With("$limit", limit);
            return ReadAll(select);
        }));

    public Task<ReadingSpan?> SpanAsync(string siteId, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read<ReadingSpan?>((connection, transaction) =>
        {
            using var select = connection.Command(transaction, """
                    SELECT min(r.time_ms), max(r.time_ms), count(*) FROM readings r
                    JOIN sites s ON s.key = r.site_key WHERE s.id = $id;
                    """)
                .With("$id", siteId);
            using var reader = select.ExecuteReader();
            return reader.Read() && !reader.IsDBNull(0)
                ? new ReadingSpan(reader.GetInt64(0), reader.GetInt64(1), reader.GetInt64(2))
                : null;
        }));

    private static (long Key, QualityLimits Limits)? FindSite(SqliteConnection connection, SqliteTransaction transaction, string siteId)
    {
        using var select = connection.Command(transaction,
                "SELECT key, min_c, max_c, max_step_c_per_hour, flatline_hours FROM sites WHERE id = $id;")
            .With("$id", siteId);
        using var reader = select.ExecuteReader();
        if (!reader.Read())
        {
            return null;
        }
        return (reader.GetInt64(0), new QualityLimits(reader.GetDouble(1), reader.GetDouble(2), reader.GetDouble(3), reader.GetDouble(4)));
    }

    // The stored readings the QC rules need: the flat-line span around the new readings, and at
    // least a flat line's worth of readings on each side, whatever their spacing.
    private static List<StoredReading> LoadNeighbourhood(SqliteConnection connection, SqliteTransaction transaction,
        long siteKey, IReadOnlyList<IncomingReading> readings, double flatlineHours)
    {
        var first = readings.Min(r => r.TimeMs);
        var last = readings.Max(r => r.TimeMs);
        var span = (long)Math.Ceiling(flatlineHours * 3_600_000);
        using var select = connection.Command(transaction, $"""
                SELECT {ReadingColumns} FROM readings
                WHERE site_key = $site
                  AND time_ms >= min($first - $span, coalesce((SELECT min(time_ms) FROM (
                      SELECT time_ms FROM readings WHERE site_key = $site AND time_ms < $first
                      ORDER BY time_ms DESC LIMIT $count)), $first))
                  AND time_ms <= max($last + $span, coalesce((SELECT max(time_ms) FROM (
                      SELECT time_ms FROM readings WHERE site_key = $site AND time_ms > $last
                      ORDER BY time_ms LIMIT $count)), $last))
                ORDER BY time_ms;
                """)
            .With("$site", siteKey)
            .With("$first", first)
            .With("$last", last)
            .With("$span", span)
            .With("$count", IngestPlanner.NeighbourCount);
        return ReadAll(select);
    }

    private static List<StoredReading> ReadAll(SqliteCommand select)
    {
        using var reader = select.ExecuteReader();
        var readings = new List<StoredReading>();
        while (reader.Read())
        {
            readings.Add(new StoredReading(reader.GetInt64(0), reader.GetDouble(1), reader.GetDouble(2), reader.GetString(3),
                (QualityFlags)reader.GetInt32(4)));
        }
        return readings;
    }

    // All new rows go in as one JSON array parameter that SQLite unpacks itself: the driver binds
    // parameters by name one at a time, which costs more than the insert when done per row.
    private static void Insert(SqliteConnection connection, SqliteTransaction transaction, long siteKey,
        IReadOnlyList<StoredReading> rows, long receivedAtMs)
    {
        if (rows.Count == 0)
        {
            return;
        }
        using var insert = connection.Command(transaction, """
                INSERT INTO readings (site_key, time_ms, value_c, original_value, original_unit, flags, received_at_ms)
                SELECT $site, value ->> 0, value ->> 1, value ->> 2, value ->> 3, value ->> 4, $received FROM json_each($rows);
                """)
            .With("$site", siteKey)
            .With("$received", receivedAtMs)
            .With("$rows", RowsAsJson(rows));
        var inserted = insert.ExecuteNonQuery();
        if (inserted != rows.Count)
        {
            throw new InvalidOperationException($"Inserted {inserted} readings of {rows.Count}.");
        }
    }

    /// <summary><c>[[time_ms, value_c, original_value, "unit", flags], ...]</c>; doubles are written
    /// in their shortest round-trip form, which SQLite reads back to the same bits.</summary>
    internal static string RowsAsJson(IReadOnlyList<StoredReading> rows)
    {
        var buffer = new System.Buffers.ArrayBufferWriter<byte>(rows.Count * 48);
        using (var json = new System.Text.Json.Utf8JsonWriter(buffer))
        {
            json.WriteStartArray();
            foreach (var row in rows)
            {
                json.WriteStartArray();
                json.WriteNumberValue(row.TimeMs);
                json.WriteNumberValue(row.ValueC);
                json.WriteNumberValue(row.OriginalValue);
                json.WriteStringValue(row.OriginalUnit);
                json.WriteNumberValue((int)row.Flags);
                json.WriteEndArray();
            }
            json.WriteEndArray();
        }
        return System.Text.Encoding.UTF8.GetString(buffer.WrittenSpan);
    }

    private static void Update(SqliteConnection connection, SqliteTransaction transaction, long siteKey,
        IReadOnlyList<StoredReading> rows, long receivedAtMs)
    {
        using var update = connection.Command(transaction, """
            UPDATE readings SET value_c = $value, original_value = $original, original_unit = $unit, flags = $flags,
                received_at_ms = CASE WHEN value_c = $value AND original_unit = $unit THEN received_at_ms ELSE $received END
            WHERE site_key = $site AND time_ms = $time;
            """);
        WriteRows(update, siteKey, rows, receivedAtMs);
    }

    private static void WriteRows(SqliteCommand command, long siteKey, IReadOnlyList<StoredReading> rows, long receivedAtMs)
    {
        if (rows.Count == 0)
        {
            return;
        }
        command.With("$site", siteKey).With("$received", receivedAtMs);
        var time = command.Parameters.Add("$time", SqliteType.Integer);
        var value = command.Parameters.Add("$value", SqliteType.Real);
        var original = command.Parameters.Add("$original", SqliteType.Real);
        var unit = command.Parameters.Add("$unit", SqliteType.Text);
        var flags = command.Parameters.Add("$flags", SqliteType.Integer);
        command.Prepare();
        foreach (var row in rows)
        {
            time.Value = row.TimeMs;
            value.Value = row.ValueC;
            original.Value = row.OriginalValue;
            unit.Value = row.OriginalUnit;
            flags.Value = (int)row.Flags;
            command.ExecuteNonQuery();
        }
    }
}
