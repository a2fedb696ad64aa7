using ForecastHub.Core.Grid;
using ForecastHub.Core.Quality;
using ForecastHub.Storage.Postgres.Cluster;
using ForecastHub.Storage.Readings;
using Npgsql;
using NpgsqlTypes;

namespace ForecastHub.Storage.Postgres.Readings;

/// <summary>
/// Readings on PostgreSQL. An ingest locks its site's row first, so ingests of one site queue across
/// every node while other sites go on; under that lock the stored neighbourhood is read, the shared
/// <see cref="IngestPlanner"/> decides every outcome and flag, and the planned rows are written by
/// one binary COPY (new rows) and one array-bound UPDATE, committed with synchronous_commit on before it answers.
/// </summary>
public sealed class PostgresReadingStore(PostgresDatabase database) : IReadingStore
{
    private const string ReadingColumns = "time_ms, value_c, original_value, original_unit, flags";

    public Task<IngestResult?> IngestAsync(string siteId, IReadOnlyList<IncomingReading> readings, ConflictPolicy policy,
        DateTimeOffset receivedAt, long? siteKey = null, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(readings);
        return database.WriteAsync<IngestResult?>(async (connection, transaction) =>
        {
            var site = await LockSiteAsync(connection, transaction, siteId, cancellationToken).ConfigureAwait(false);
            if (site is null || (siteKey is { } expected && site.Value.Key != expected))
            {
                return null;
            }
            if (readings.Count == 0)
            {
                return new IngestResult([]);
            }
            var (key, limits) = site.Value;
            var stored = await LoadNeighbourhoodAsync(connection, transaction, key, readings, limits.FlatlineHours, cancellationToken).ConfigureAwait(false);
            var plan = IngestPlanner.Plan(stored, readings, policy, limits);
            var receivedMs = receivedAt.ToUnixTimeMilliseconds();
            await InsertAsync(connection, key, plan.Inserts, receivedMs, cancellationToken).ConfigureAwait(false);
            await UpdateAsync(connection, transaction, key, plan.Updates, receivedMs, cancellationToken).ConfigureAwait(false);
            if (plan.Inserts.Count > 0 || plan.Updates.Count > 0)
            {
                await new ChangeNotice(ChangeKind.Data, siteId).SendAsync(connection, transaction, cancellationToken).ConfigureAwait(false);
            }
            return plan.Result();
        }, cancellationToken);
    }

    public Task<IReadOnlyList<StoredReading>?> ReadAsync(string siteId, long fromMs, long toMs, long? afterMs, int limit,
        CancellationToken cancellationToken = default) =>
        database.QueryAsync<IReadOnlyList<StoredReading>?>(async connection =>
        {
            var start = afterMs is { } after && after >= fromMs ? after + 1 : fromMs;
            // One statement: the site's existence and its readings come from the same snapshot.
            await using var select = connection.Command(null, $"""
                    SELECT s.key, r.time_ms, r.value_c, r.original_value, r.original_unit, r.flags
                    FROM sites s LEFT JOIN LATERAL (
                        SELECT {ReadingColumns} FROM readings
                        WHERE site_key = s.key AND time_ms >= $2 AND time_ms < $3
                        ORDER BY time_ms LIMIT $4) r ON true
                    WHERE s.id = $1;
                    """)
                .With(siteId).With(start).With(toMs).With(limit);
            await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
            return await SiteRowsAsync(reader, r => new StoredReading(r.GetInt64(1), r.GetDouble(2), r.GetDouble(3), r.GetString(4),
                (QualityFlags)r.GetInt32(5)), cancellationToken).ConfigureAwait(false);
        }, cancellationToken);

    public Task<IReadOnlyList<GridReading>?> ReadGridAsync(string siteId, long fromMs, long toMs, CancellationToken cancellationToken = default) =>
        database.QueryAsync<IReadOnlyList<GridReading>?>(async connection =>
        {
            // One statement: the site's existence and its readings come from the same snapshot.
            await using var select = connection.Command(null, """
                    SELECT s.key, r.time_ms, r.value_c, r.flags
                    FROM sites s LEFT JOIN LATERAL (
                        SELECT time_ms, value_c, flags FROM readings
                        WHERE site_key = s.key AND time_ms >= $2 AND time_ms < $3
                        ORDER BY time_ms) r ON true
                    WHERE s.id = $1;
                    """)
                .With(siteId).With(fromMs).With(toMs);
            await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
            return await SiteRowsAsync(reader, r => new GridReading(DateTimeOffset.FromUnixTimeMilliseconds(r.GetInt64(1)), r.GetDouble(2), r.GetInt32(3) != 0),
                cancellationToken).ConfigureAwait(false);
        }, cancellationToken);

    // Rows of a site LEFT JOIN LATERAL its readings: no row means no site; a row with a null time is a site without readings in range.
    private static async Task<IReadOnlyList<T>?> SiteRowsAsync<T>(NpgsqlDataReader reader, Func<NpgsqlDataReader, T> row, CancellationToken cancellationToken)
    {
        var list = new List<T>();
        var found = false;
        while (await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
        {
            found = true;
            if (!reader.IsDBNull(1))
            {
                list.Add(row(reader));
            }
        }

        return found ? list : null;
    }

    public Task<ReadingSpan?> SpanAsync(string siteId, CancellationToken cancellationToken = default) =>
        database.QueryAsync<ReadingSpan?>(async connection =>
        {
            await using var select = connection.Command(null, """
                    SELECT min(r.time_ms), max(r.time_ms), count(*) FROM readings r
                    JOIN sites s ON s.key = r.site_key WHERE s.id = $1;
                    """).With(siteId);
            await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
            return await reader.ReadAsync(cancellationToken).ConfigureAwait(false) && !reader.IsDBNull(0)
                ? new ReadingSpan(reader.GetInt64(0), reader.GetInt64(1), reader.GetInt64(2))
                : null;
        }, cancellationToken);

    // FOR NO KEY UPDATE: ingests of the site wait for each other, while inserts of readings
    // (which take a key-share lock for their foreign key) are not blocked.
    private static async Task<(long Key, QualityLimits Limits)?> LockSiteAsync(NpgsqlConnection connection, NpgsqlTransaction transaction,
        string siteId, CancellationToken cancellationToken)
    {
        await using var select = connection.Command(transaction,
            "SELECT key, min_c, max_c, max_step_c_per_hour, flatline_hours FROM sites WHERE id = $1 FOR NO KEY UPDATE;").With(siteId);
        await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
        if (!await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
        {
            return null;
        }
        return (reader.GetInt64(0), new QualityLimits(reader.GetDouble(1), reader.GetDouble(2), reader.GetDouble(3), reader.GetDouble(4)));
    }

    // The stored readings the QC rules need: the flat-line span around the new readings, and at
    // least a flat line's worth of readings on each side, whatever their spacing.
    private static async Task<List<StoredReading>> LoadNeighbourhoodAsync(NpgsqlConnection connection, NpgsqlTransaction transaction,
        long siteKey, IReadOnlyList<IncomingReading> readings, double flatlineHours, CancellationToken cancellationToken)
    {
        var first = long.MaxValue;
        var last = long.MinValue;
        foreach (var r in readings)
        {
            first = Math.Min(first, r.TimeMs);
            last = Math.Max(last, r.TimeMs);
        }
        var span = (long)Math.Ceiling(flatlineHours * 3_600_000);
        await using var select = connection.Command(transaction, $"""
                SELECT {ReadingColumns} FROM readings
                WHERE site_key = $1
                  AND time_ms >= least($2 - $4, coalesce((SELECT min(time_ms) FROM (
                      SELECT time_ms FROM readings WHERE site_key = $1 AND time_ms < $2
                      ORDER BY time_ms DESC LIMIT $5) b), $2))
                  AND time_ms <= greatest($3 + $4, coalesce((SELECT max(time_ms) FROM (
                      SELECT time_ms FROM readings WHERE site_key = $1 AND time_ms > $3
                      ORDER BY time_ms LIMIT $5) a), $3))
                ORDER BY time_ms;
                """)
            .With(siteKey).With(first).With(last).With(span).With(IngestPlanner.NeighbourCount);
        await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
        var list = new List<StoredReading>();
        while (await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
        {
            list.Add(new StoredReading(reader.GetInt64(0), reader.GetDouble(1), reader.GetDouble(2), reader.GetString(3), (QualityFlags)reader.GetInt32(4)));
        }
        return list;
    }

    // New rows by binary COPY straight into the table: the planner has already ruled out every key
    // conflict under the site's lock, so there is nothing to merge, and COPY skips the per-row
    // executor work of INSERT ... SELECT. It runs inside the ingest's transaction.
    private static async Task InsertAsync(NpgsqlConnection connection, long siteKey,
        IReadOnlyList<StoredReading> rows, long receivedMs, CancellationToken cancellationToken)
    {
        if (rows.Count == 0)
        {
            return;
        }
        await using var copy = await connection.BeginBinaryImportAsync(
            "COPY readings (site_key, time_ms, value_c, original_value, original_unit, flags, received_at_ms) FROM STDIN (FORMAT BINARY);",
            cancellationToken).ConfigureAwait(false);
        foreach (var row in rows)
        {
            await copy.StartRowAsync(cancellationToken).ConfigureAwait(false);
            await copy.WriteAsync(siteKey, NpgsqlDbType.Bigint, cancellationToken).ConfigureAwait(false);
            await copy.WriteAsync(row.TimeMs, NpgsqlDbType.Bigint, cancellationToken).ConfigureAwait(false);
            await copy.WriteAsync(row.ValueC, NpgsqlDbType.Double, cancellationToken).ConfigureAwait(false);
            await copy.WriteAsync(row.OriginalValue, NpgsqlDbType.Double, cancellationToken).ConfigureAwait(false);
            await copy.WriteAsync(row.OriginalUnit, NpgsqlDbType.Text, cancellationToken).ConfigureAwait(false);
            await copy.WriteAsync((int)row.Flags, NpgsqlDbType.Integer, cancellationToken).ConfigureAwait(false);
            await copy.WriteAsync(receivedMs, NpgsqlDbType.Bigint, cancellationToken).ConfigureAwait(false);
        }
        await copy.CompleteAsync(cancellationToken).ConfigureAwait(false);
    }

    // A replaced value gets the new receipt time; a row whose flags alone changed keeps its own.
    private static async Task UpdateAsync(NpgsqlConnection connection, NpgsqlTransaction transaction, long siteKey,
        IReadOnlyList<StoredReading> rows, long receivedMs, CancellationToken cancellationToken)
    {
        if (rows.Count == 0)
        {
            return;
        }
        await using var update = connection.Command(transaction, """
            UPDATE readings r SET value_c = u.value_c, original_value = u.original_value, original_unit = u.original_unit,
                flags = u.flags,
                received_at_ms = CASE WHEN r.value_c = u.value_c AND r.original_unit = u.original_unit THEN r.received_at_ms ELSE $2 END
            FROM unnest($3::bigint[], $4::double precision[], $5::double precision[], $6::text[], $7::integer[])
                AS u (time_ms, value_c, original_value, original_unit, flags)
            WHERE r.site_key = $1 AND r.time_ms = u.time_ms;
            """);
        BindRows(update.With(siteKey).With(receivedMs), rows);
        await update.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
    }

    private static void BindRows(NpgsqlCommand command, IReadOnlyList<StoredReading> rows)
    {
        var times = new long[rows.Count];
        var values = new double[rows.Count];
        var originals = new double[rows.Count];
        var units = new string[rows.Count];
        var flags = new int[rows.Count];
        for (var i = 0; i < rows.Count; i++)
        {
            var row = rows[i];
            times[i] = row.TimeMs;
            values[i] = row.ValueC;
            originals[i] = row.OriginalValue;
            units[i] = row.OriginalUnit;
            flags[i] = (int)row.Flags;
        }
        command.With(times, NpgsqlDbType.Array | NpgsqlDbType.Bigint)
            .With(values, NpgsqlDbType.Array | NpgsqlDbType.Double)
            .With(originals, NpgsqlDbType.Array | NpgsqlDbType.Double)
            .With(units, NpgsqlDbType.Array | NpgsqlDbType.Text)
            .With(flags, NpgsqlDbType.Array | NpgsqlDbType.Integer);
    }
}
