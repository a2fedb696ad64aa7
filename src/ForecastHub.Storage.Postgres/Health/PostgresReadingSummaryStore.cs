using ForecastHub.Storage.Health;

namespace ForecastHub.Storage.Postgres.Health;

public sealed class PostgresReadingSummaryStore(PostgresDatabase database) : IReadingSummaryStore
{
    private const long DayMs = 24 * 3600 * 1000L;

    public Task<ReadingSummary?> GetAsync(string siteId, CancellationToken cancellationToken = default) =>
        database.ReadAsync(async (connection, transaction) =>
        {
            await using var newest = connection.Command(transaction, """
                SELECT s.key, r.time_ms, r.flags FROM sites s
                LEFT JOIN LATERAL (SELECT time_ms, flags FROM readings WHERE site_key = s.key ORDER BY time_ms DESC LIMIT 1) r ON true
                WHERE s.id = $1;
                """).With(siteId);
            long siteKey, lastMs;
            int lastFlags;
            await using (var reader = await newest.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false))
            {
                if (!await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
                {
                    return null;
                }
                if (reader.IsDBNull(1))
                {
                    return new ReadingSummary(null, 0, 0, 0);
                }
                (siteKey, lastMs, lastFlags) = (reader.GetInt64(0), reader.GetInt64(1), reader.GetInt32(2));
            }
            await using var counts = connection.Command(transaction, """
                SELECT count(*)::integer, count(*) FILTER (WHERE flags <> 0)::integer FROM readings
                WHERE site_key = $1 AND time_ms > $2 AND time_ms <= $3;
                """).With(siteKey).With(lastMs - DayMs).With(lastMs);
            await using var countReader = await counts.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
            await countReader.ReadAsync(cancellationToken).ConfigureAwait(false);
            return new ReadingSummary(NpgsqlExtensions.FromUnixMs(lastMs), lastFlags, countReader.GetInt32(0), countReader.GetInt32(1));
        }, cancellationToken);

    public Task<StepsWithData> CountStepsWithDataAsync(string siteId, DateTimeOffset from, long stepMs, long offsetMs, CancellationToken cancellationToken = default) =>
        database.QueryAsync(async connection =>
        {
            // Integer division truncates as on SQLite, so both backends count the same steps.
            await using var count = connection.Command(null, """
                SELECT count(DISTINCT (r.time_ms + $4) / $3)::integer, max(r.time_ms) FROM readings r JOIN sites s ON s.key = r.site_key
                WHERE s.id = $1 AND r.flags = 0 AND r.time_ms >= $2;
                """).With(siteId).With(from.ToUnixTimeMilliseconds()).With(stepMs).With(offsetMs);
            await using var reader = await count.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
            await reader.ReadAsync(cancellationToken).ConfigureAwait(false);
            return new StepsWithData(reader.GetInt32(0), reader.IsDBNull(1) ? null : NpgsqlExtensions.FromUnixMs(reader.GetInt64(1)));
        }, cancellationToken);
}
