using ForecastHub.Storage.Alerts;
using ForecastHub.Storage.Postgres.Webhooks;
using Npgsql;

namespace ForecastHub.Storage.Postgres.Alerts;

/// <summary>Alert state shared by every node, changed in one transaction with the outbox rows it causes.</summary>
public sealed class PostgresAlertStore(PostgresDatabase database) : IAlertStore
{
    /// <summary>
    /// A session advisory lock per site, held on its own connection: a second node asking for it
    /// waits until the first has applied its change, so it then reads that change and never raises
    /// the same risk again. A node that dies loses its session, and with it the lock.
    /// </summary>
    public async Task<IAsyncDisposable> LockAsync(string siteId, CancellationToken cancellationToken = default)
    {
        var connection = await database.OpenAsync(cancellationToken).ConfigureAwait(false);
        try
        {
            await using var take = connection.Command(null, "SELECT pg_advisory_lock(hashtextextended($1, 0));").With("alerts:" + siteId);
            await take.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
            return new SiteLock(connection, siteId);
        }
        catch
        {
            await connection.DisposeAsync().ConfigureAwait(false);
            throw;
        }
    }

    public Task<SiteAlertState> GetAsync(string siteId, CancellationToken cancellationToken = default) =>
        database.ReadAsync(async (connection, transaction) =>
        {
            List<RaisedAlert> raised;
            await using (var select = connection.Command(transaction, $"SELECT {RaisedAlert.Columns} FROM raised_alerts WHERE site_id = $1 ORDER BY threshold_id, window_name;")
                             .With(siteId))
            {
                raised = await ReadAlertsAsync(select, cancellationToken).ConfigureAwait(false);
            }

            await using var health = connection.Command(transaction, "SELECT state FROM site_health_states WHERE site_id = $1;").With(siteId);
            return new SiteAlertState(raised, await health.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false) as string);
        }, cancellationToken);

    public Task<bool> ApplyAsync(SiteAlertChange change, DateTimeOffset at, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(change);
        return database.WriteAsync(async (connection, transaction) =>
        {
            if (change.IsRecomputable)
            {
                // Nothing is sent with it, so the commit need not wait for the disk (see SiteAlertChange.IsRecomputable).
                await using var relaxed = connection.Command(transaction, "SET LOCAL synchronous_commit = off;");
                await relaxed.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
            }

            // FOR SHARE holds off a DELETE of the site until this commits, so its trigger then removes what is written here;
            // the key refuses a change for a site deleted and created again since the evaluation read it.
            await using (var exists = connection.Command(transaction, "SELECT 1 FROM sites WHERE id = $1 AND key = $2 FOR SHARE;")
                             .With(change.SiteId).With(change.SiteKey))
            {
                if (await exists.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false) is null)
                {
                    return false;
                }
            }

            foreach (var alert in change.Upserts)
            {
                await using var upsert = connection.Command(transaction, $"""
                    INSERT INTO raised_alerts ({RaisedAlert.Columns}) VALUES ($1, $2, $3, $4, $5, $6, $7, $8)
                    ON CONFLICT (site_id, threshold_id, window_name) DO UPDATE SET
                        window_from_ms = excluded.window_from_ms, window_to_ms = excluded.window_to_ms,
                        raised_at_ms = excluded.raised_at_ms, updated_at_ms = excluded.updated_at_ms, detail_json = excluded.detail_json;
                    """)
                    .With(change.SiteId)
                    .With(alert.ThresholdId)
                    .With(alert.WindowName)
                    .With(alert.WindowFrom.ToUnixTimeMilliseconds())
                    .With(alert.WindowTo.ToUnixTimeMilliseconds())
                    .With(alert.RaisedAt.ToUnixTimeMilliseconds())
                    .With(alert.UpdatedAt.ToUnixTimeMilliseconds())
                    .With(alert.DetailJson);
                await upsert.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
            }

            foreach (var (thresholdId, windowName) in change.Clears)
            {
                await using var delete = connection.Command(transaction,
                        "DELETE FROM raised_alerts WHERE site_id = $1 AND threshold_id = $2 AND window_name = $3;")
                    .With(change.SiteId).With(thresholdId).With(windowName);
                await delete.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
            }

            if (change.HealthState is not null)
            {
                await using var health = connection.Command(transaction, """
                    INSERT INTO site_health_states (site_id, state, changed_at_ms) VALUES ($1, $2, $3)
                    ON CONFLICT (site_id) DO UPDATE SET state = excluded.state, changed_at_ms = excluded.changed_at_ms;
                    """)
                    .With(change.SiteId).With(change.HealthState).With(at.ToUnixTimeMilliseconds());
                await health.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
            }

            foreach (var outgoing in change.Events)
            {
                await PostgresWebhookStore.EnqueueAsync(connection, transaction, outgoing, at, cancellationToken).ConfigureAwait(false);
            }

            return true;
        }, cancellationToken);
    }

    public Task<IReadOnlyList<RaisedAlert>> ListRaisedAsync((string SiteId, string ThresholdId, string WindowName)? after, int limit,
        CancellationToken cancellationToken = default) =>
        database.QueryAsync<IReadOnlyList<RaisedAlert>>(async connection =>
        {
            await using var select = connection.Command(null, $"""
                SELECT {RaisedAlert.Columns} FROM raised_alerts
                WHERE (site_id, threshold_id, window_name) > ($1, $2, $3)
                ORDER BY site_id, threshold_id, window_name LIMIT $4;
                """)
                .With(after?.SiteId ?? "").With(after?.ThresholdId ?? "").With(after?.WindowName ?? "").With(limit);
            return await ReadAlertsAsync(select, cancellationToken).ConfigureAwait(false);
        }, cancellationToken);

    private static async Task<List<RaisedAlert>> ReadAlertsAsync(NpgsqlCommand select, CancellationToken cancellationToken)
    {
        await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
        var raised = new List<RaisedAlert>();
        while (await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
        {
            raised.Add(RaisedAlert.Read(reader));
        }

        return raised;
    }

    private sealed class SiteLock(NpgsqlConnection connection, string siteId) : IAsyncDisposable
    {
        public async ValueTask DisposeAsync()
        {
            try
            {
                await using var release = connection.Command(null, "SELECT pg_advisory_unlock(hashtextextended($1, 0));").With("alerts:" + siteId);
                await release.ExecuteNonQueryAsync().ConfigureAwait(false);
            }
            finally
            {
                await connection.DisposeAsync().ConfigureAwait(false);
            }
        }
    }
}
