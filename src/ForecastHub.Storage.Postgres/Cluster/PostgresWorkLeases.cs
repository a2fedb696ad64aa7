using ForecastHub.Storage.Cluster;

namespace ForecastHub.Storage.Postgres.Cluster;

/// <summary>
/// Leases as rows of <c>work_leases</c>, timed by the database's clock so nodes' clocks need not
/// agree. Taking is one upsert whose conflict branch only fires for an expired lease or the same
/// holder; PostgreSQL locks the row for it, so two nodes racing for one lease cannot both win.
/// </summary>
public sealed class PostgresWorkLeases(PostgresDatabase database) : IWorkLeases
{
    public Task<bool> TryTakeAsync(string kind, string subject, string holder, TimeSpan duration, CancellationToken cancellationToken = default) =>
        database.QueryAsync(async connection =>
        {
            await using var take = connection.Command(null, """
                INSERT INTO work_leases (kind, subject, holder, expires_at)
                VALUES ($1, $2, $3, clock_timestamp() + $4 * interval '1 millisecond')
                ON CONFLICT (kind, subject) DO UPDATE SET holder = excluded.holder, expires_at = excluded.expires_at
                WHERE work_leases.expires_at <= clock_timestamp() OR work_leases.holder = excluded.holder
                RETURNING holder;
                """).With(kind).With(subject).With(holder).With(duration.TotalMilliseconds);
            return await take.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false) is string;
        }, cancellationToken);

    public Task ReleaseAsync(string kind, string subject, string holder, CancellationToken cancellationToken = default) =>
        database.QueryAsync(async connection =>
        {
            await using var release = connection.Command(null, "DELETE FROM work_leases WHERE kind = $1 AND subject = $2 AND holder = $3;")
                .With(kind).With(subject).With(holder);
            return await release.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
        }, cancellationToken);
}
