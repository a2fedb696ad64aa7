using System.Globalization;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Quality;
using Microsoft.Data.Sqlite;
using SQLitePCL;

namespace ForecastHub.Storage.Readings;

public sealed class SqliteReadingStore(SqliteDatabase database) : IReadingStore
{
    private const string ReadingColumns = "time_ms, value_c, original_value, original_unit, flags";

    public Task<IngestResult?> IngestAsync(string siteId, IReadOnlyList<IncomingReading> readings, ConflictPolicy policy,
        DateTimeOffset receivedAt, long? siteKey = null, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(readings);
        return database.WriteAsync<IngestResult?>((connection, transaction) =>
        {
            var site = FindSite(connection, transaction, siteId);
            if (site is null || (siteKey is { } expected && site.Value.Key != expected))
            {
                return null;
            }
            var (key, limits) = site.Value;
            if (readings.Count == 0)
            {
                return new IngestResult([]);
            }
            var stored = LoadNeighbourhood(connection, transaction, key, readings, limits.FlatlineHours);
            var plan = IngestPlanner.Plan(stored, readings, policy, limits);
            Insert(connection, key, plan.Inserts, receivedAt.ToUnixTimeMilliseconds());
            Update(connection, transaction, key, plan.Updates, receivedAt.ToUnixTimeMilliseconds());
            return plan.Result();
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

    public Task<IReadOnlyList<GridReading>?> ReadGridAsync(string siteId, long fromMs, long toMs, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read<IReadOnlyList<GridReading>?>((connection, transaction) =>
        {
            var site = FindSite(connection, transaction, siteId);
            if (site is null)
            {
                return null;
            }
            // A refit reads years of rows: the range is read in time slices side by side, on one snapshot.
            var slices = GridReadSlices(fromMs, toMs);
            var parts = database.ReadPartsOnSnapshot(connection, transaction, slices, (reader, _, i) =>
                ReadGridRows(reader, site.Value.Key, SliceBound(fromMs, toMs, slices, i), SliceBound(fromMs, toMs, slices, i + 1), SqliteRowCalls.Available));
            return PooledGridRows.Join(parts);
        }));

    /// <summary>Rows per slice of a grid read, at one reading an hour: below it, a second connection costs more than it saves.</summary>
    private const long RowsPerSlice = 8_760;

    /// <summary>Whole hours in [from, to): at one reading an hour, the common logging rate, about the rows a grid read meets.</summary>
    private static long HoursIn(long fromMs, long toMs) => (toMs - fromMs) / 3_600_000;

    private static int GridReadSlices(long fromMs, long toMs) =>
        (int)Math.Clamp(HoursIn(fromMs, toMs) / RowsPerSlice, 1, Math.Min(Environment.ProcessorCount, 4));

    private static long SliceBound(long fromMs, long toMs, int slices, int i) =>
        i == slices ? toMs : fromMs + ((toMs - fromMs) / slices * i);

    /// <summary>Straight on SQLite's statement API: a refit reads ten years of hourly rows, and the data reader's
    /// per-column checks cost more than the engine's scan.</summary>
    /// <param name="nativeCalls">Step and read columns through <see cref="SqliteRowCalls"/> (when it is available), else
    /// through SQLitePCL's safe handles; both give the same rows.</param>
    internal static ArraySegment<GridReading> ReadGridRows(SqliteConnection connection, long siteKey, long fromMs, long toMs, bool nativeCalls)
    {
        var db = connection.Handle!;
        SqliteException.ThrowExceptionForRC(raw.sqlite3_prepare_v2(db,
            "SELECT time_ms, value_c, flags FROM readings WHERE site_key = ?1 AND time_ms >= ?2 AND time_ms < ?3 ORDER BY time_ms;",
            out var statement), db);
        using (statement)
        {
            SqliteException.ThrowExceptionForRC(
                raw.sqlite3_bind_int64(statement, 1, siteKey) | raw.sqlite3_bind_int64(statement, 2, fromMs) | raw.sqlite3_bind_int64(statement, 3, toMs), db);
            // Sized for one reading an hour, so ten years are read without growing and copying; rented, so a refit's rows
            // land in memory already paged in. Not cleared: only the rows read are handed out, so the tail is never seen.
            var rows = PooledGridRows.Rent((int)Math.Clamp(HoursIn(fromMs, toMs) + 1, 1024, 1 << 17));
            var count = 0;
            int step;
            if (nativeCalls)
            {
                // The statement's handle stays alive to the using's end, so its pointer is valid for the loop.
                var native = statement.DangerousGetHandle();
                while ((step = SqliteRowCalls.Step(native)) == raw.SQLITE_ROW)
                {
                    Add(SqliteRowCalls.Int64(native, 0), SqliteRowCalls.Double(native, 1), SqliteRowCalls.Int64(native, 2));
                }
            }
            else
            {
                while ((step = raw.sqlite3_step(statement)) == raw.SQLITE_ROW)
                {
                    Add(raw.sqlite3_column_int64(statement, 0), raw.sqlite3_column_double(statement, 1), raw.sqlite3_column_int64(statement, 2));
                }
            }

            void Add(long timeMs, double valueC, long flags)
            {
                if (count == rows.Length)
                {
                    var larger = PooledGridRows.Rent(rows.Length * 2);
                    rows.AsSpan().CopyTo(larger);
                    PooledGridRows.Return(rows);
                    rows = larger;
                }

                rows[count++] = new GridReading(DateTimeOffset.FromUnixTimeMilliseconds(timeMs), valueC, flags != 0);
            }

            if (step != raw.SQLITE_DONE)
            {
                SqliteException.ThrowExceptionForRC(step, db);
            }

            return new ArraySegment<GridReading>(rows, 0, count);
        }
    }

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

    internal static (long Key, QualityLimits Limits)? FindSite(SqliteConnection connection, SqliteTransaction transaction, string siteId)
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
    internal static List<StoredReading> LoadNeighbourhood(SqliteConnection connection, SqliteTransaction transaction,
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

    /// <summary>Rows per INSERT statement: enough to make the per-statement cost small, few enough
    /// parameters (5 per row) to stay far below SQLite's limit.</summary>
    internal const int RowsPerInsert = 100;

    private static readonly string FullInsertSql = InsertSql(RowsPerInsert);

    // New rows go in through multi-row INSERT statements prepared once and bound by position with the
    // SQLite C API: the driver looks each parameter up by name per execution, which cost 3-4 times
    // the insert itself (ingest-stages benchmark).
    internal static void Insert(SqliteConnection connection, long siteKey, IReadOnlyList<StoredReading> rows, long receivedAtMs)
    {
        var whole = rows.Count / RowsPerInsert * RowsPerInsert;
        if (whole > 0)
        {
            InsertRows(connection, FullInsertSql, RowsPerInsert, siteKey, rows, 0, whole, receivedAtMs);
        }
        if (rows.Count > whole)
        {
            var rest = rows.Count - whole;
            InsertRows(connection, InsertSql(rest), rest, siteKey, rows, whole, rows.Count, receivedAtMs);
        }
    }

    // (?1 = site, ?2 = received) shared by every row; row i binds ?(3 + 5i) .. ?(7 + 5i).
    private static string InsertSql(int rowsPerStatement)
    {
        var sql = new System.Text.StringBuilder(
            "INSERT INTO readings (site_key, time_ms, value_c, original_value, original_unit, flags, received_at_ms) VALUES ");
        for (var i = 0; i < rowsPerStatement; i++)
        {
            var p = 3 + (5 * i);
            sql.Append(i == 0 ? "" : ",").Append(CultureInfo.InvariantCulture, $"(?1,?{p},?{p + 1},?{p + 2},?{p + 3},?{p + 4},?2)");
        }
        return sql.Append(';').ToString();
    }

    private static void InsertRows(SqliteConnection connection, string sql, int rowsPerStatement, long siteKey,
        IReadOnlyList<StoredReading> rows, int from, int to, long receivedAtMs)
    {
        var db = connection.Handle!;
        SqliteException.ThrowExceptionForRC(raw.sqlite3_prepare_v2(db, sql, out var statement), db);
        using (statement)
        {
            var rc = raw.sqlite3_bind_int64(statement, 1, siteKey) | raw.sqlite3_bind_int64(statement, 2, receivedAtMs);
            for (var at = from; at < to; at += rowsPerStatement)
            {
                for (var i = 0; i < rowsPerStatement; i++)
                {
                    var row = rows[at + i];
                    var p = 3 + (5 * i);
                    rc |= raw.sqlite3_bind_int64(statement, p, row.TimeMs)
                        | raw.sqlite3_bind_double(statement, p + 1, row.ValueC)
                        | raw.sqlite3_bind_double(statement, p + 2, row.OriginalValue)
                        | raw.sqlite3_bind_text(statement, p + 3, Utf8(row.OriginalUnit))
                        | raw.sqlite3_bind_int(statement, p + 4, (int)row.Flags);
                }
                // Every bind answers SQLITE_OK (0) unless something is wrong, so one check covers them all.
                SqliteException.ThrowExceptionForRC(rc, db);
                var step = raw.sqlite3_step(statement);
                if (step != raw.SQLITE_DONE)
                {
                    SqliteException.ThrowExceptionForRC(step, db);
                }
                SqliteException.ThrowExceptionForRC(raw.sqlite3_reset(statement), db);
            }
        }
    }

    private static ReadOnlySpan<byte> Utf8(string unit) => unit switch
    {
        "C" => "C"u8,
        "F" => "F"u8,
        "K" => "K"u8,
        _ => System.Text.Encoding.UTF8.GetBytes(unit),
    };

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
