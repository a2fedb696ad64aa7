namespace ForecastHub.Storage.Health;

public sealed class SqliteReadingSummaryStore(SqliteDatabase database) : IReadingSummaryStore
{
    private const long DayMs = 24 * 3600 * 1000L;

    public Task<ReadingSummary?> GetAsync(string siteId, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read((connection, transaction) =>
        {
            using var find = connection.Command(transaction, "SELECT key FROM sites WHERE id = $id;").With("$id", siteId);
            if (find.ExecuteScalar() is not long siteKey)
            {
                return null;
            }

            using var newest = connection.Command(transaction,
                "SELECT time_ms, flags FROM readings WHERE site_key = $key ORDER BY time_ms DESC LIMIT 1;").With("$key", siteKey);
            using var reader = newest.ExecuteReader();
            if (!reader.Read())
            {
                return new ReadingSummary(null, 0, 0, 0);
            }

            var lastMs = reader.GetInt64(0);
            var lastFlags = reader.GetInt32(1);
            using var counts = connection.Command(transaction, """
                SELECT count(*), coalesce(sum(flags <> 0), 0) FROM readings
                WHERE site_key = $key AND time_ms > $from AND time_ms <= $to;
                """).With("$key", siteKey).With("$from", lastMs - DayMs).With("$to", lastMs);
            using var countReader = counts.ExecuteReader();
            countReader.Read();
            return new ReadingSummary(SqliteExtensions.FromUnixMs(lastMs), lastFlags, countReader.GetInt32(0), countReader.GetInt32(1));
        }));

    public Task<StepsWithData> CountStepsWithDataAsync(string siteId, DateTimeOffset from, long stepMs, long offsetMs, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read((connection, transaction) =>
        {
            using var count = connection.Command(transaction, """
                SELECT count(DISTINCT (r.time_ms + $offset) / $step), max(r.time_ms) FROM readings r JOIN sites s ON s.key = r.site_key
                WHERE s.id = $id AND r.flags = 0 AND r.time_ms >= $from;
                """).With("$id", siteId).With("$from", from.ToUnixTimeMilliseconds()).With("$step", stepMs).With("$offset", offsetMs);
            using var reader = count.ExecuteReader();
            reader.Read();
            return new StepsWithData(reader.GetInt32(0), reader.IsDBNull(1) ? null : SqliteExtensions.FromUnixMs(reader.GetInt64(1)));
        }));
}
