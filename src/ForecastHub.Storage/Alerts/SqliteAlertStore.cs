using ForecastHub.Storage.Webhooks;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage.Alerts;

public sealed class SqliteAlertStore(SqliteDatabase database) : IAlertStore
{
    /// <summary>A SQLite file has one service process, whose evaluator already runs one evaluation at a time.</summary>
    public Task<IAsyncDisposable> LockAsync(string siteId, CancellationToken cancellationToken = default) =>
        Task.FromResult<IAsyncDisposable>(NothingHeld.Instance);

    public Task<SiteAlertState> GetAsync(string siteId, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read((connection, transaction) =>
        {
            var raised = new List<RaisedAlert>();
            using (var select = connection.Command(transaction, $"SELECT {RaisedAlert.Columns} FROM raised_alerts WHERE site_id = $site ORDER BY threshold_id, window_name;")
                       .With("$site", siteId))
            using (var reader = select.ExecuteReader())
            {
                while (reader.Read())
                {
                    raised.Add(RaisedAlert.Read(reader));
                }
            }

            using var health = connection.Command(transaction, "SELECT state FROM site_health_states WHERE site_id = $site;").With("$site", siteId);
            return new SiteAlertState(raised, health.ExecuteScalar() as string);
        }));

    public Task<bool> ApplyAsync(SiteAlertChange change, DateTimeOffset at, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(change);
        return change.IsRecomputable ? database.WriteRecomputableAsync(Apply, cancellationToken) : database.WriteAsync(Apply, cancellationToken);

        bool Apply(SqliteConnection connection, SqliteTransaction transaction)
        {
            using (var exists = connection.Command(transaction, "SELECT EXISTS (SELECT 1 FROM sites WHERE id = $site AND key = $key);")
                       .With("$site", change.SiteId).With("$key", change.SiteKey))
            {
                if (Convert.ToInt64(exists.ExecuteScalar(), System.Globalization.CultureInfo.InvariantCulture) == 0)
                {
                    return false;
                }
            }

            foreach (var alert in change.Upserts)
            {
                using var upsert = connection.Command(transaction, $"""
                        INSERT INTO raised_alerts ({RaisedAlert.Columns}) VALUES ($site, $threshold, $window, $from, $to, $raised, $updated, $detail)
                        ON CONFLICT (site_id, threshold_id, window_name) DO UPDATE SET
                            window_from_ms = excluded.window_from_ms, window_to_ms = excluded.window_to_ms,
                            raised_at_ms = excluded.raised_at_ms, updated_at_ms = excluded.updated_at_ms, detail_json = excluded.detail_json;
                        """)
                    .With("$site", change.SiteId)
                    .With("$threshold", alert.ThresholdId)
                    .With("$window", alert.WindowName)
                    .With("$from", alert.WindowFrom.ToUnixTimeMilliseconds())
                    .With("$to", alert.WindowTo.ToUnixTimeMilliseconds())
                    .With("$raised", alert.RaisedAt.ToUnixTimeMilliseconds())
                    .With("$updated", alert.UpdatedAt.ToUnixTimeMilliseconds())
                    .With("$detail", alert.DetailJson);
                upsert.ExecuteNonQuery();
            }

            foreach (var (thresholdId, windowName) in change.Clears)
            {
                using var delete = connection.Command(transaction,
                        "DELETE FROM raised_alerts WHERE site_id = $site AND threshold_id = $threshold AND window_name = $window;")
                    .With("$site", change.SiteId)
                    .With("$threshold", thresholdId)
                    .With("$window", windowName);
                delete.ExecuteNonQuery();
            }

            if (change.HealthState is not null)
            {
                using var health = connection.Command(transaction, """
                        INSERT INTO site_health_states (site_id, state, changed_at_ms) VALUES ($site, $state, $at)
                        ON CONFLICT (site_id) DO UPDATE SET state = excluded.state, changed_at_ms = excluded.changed_at_ms;
                        """)
                    .With("$site", change.SiteId)
                    .With("$state", change.HealthState)
                    .With("$at", at.ToUnixTimeMilliseconds());
                health.ExecuteNonQuery();
            }

            foreach (var outgoing in change.Events)
            {
                SqliteWebhookStore.Enqueue(connection, transaction, outgoing, at);
            }

            return true;
        }
    }

    public Task<IReadOnlyList<RaisedAlert>> ListRaisedAsync((string SiteId, string ThresholdId, string WindowName)? after, int limit,
        CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read<IReadOnlyList<RaisedAlert>>((connection, transaction) =>
        {
            using var select = connection.Command(transaction, $"""
                    SELECT {RaisedAlert.Columns} FROM raised_alerts
                    WHERE (site_id, threshold_id, window_name) > ($site, $threshold, $window)
                    ORDER BY site_id, threshold_id, window_name LIMIT $limit;
                    """)
                .With("$site", after?.SiteId ?? "")
                .With("$threshold", after?.ThresholdId ?? "")
                .With("$window", after?.WindowName ?? "")
                .With("$limit", limit);
            using var reader = select.ExecuteReader();
            var raised = new List<RaisedAlert>();
            while (reader.Read())
            {
                raised.Add(RaisedAlert.Read(reader));
            }

            return raised;
        }));

    private sealed class NothingHeld : IAsyncDisposable
    {
        public static readonly NothingHeld Instance = new();

        public ValueTask DisposeAsync() => ValueTask.CompletedTask;
    }
}
