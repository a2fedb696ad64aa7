using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage.Models;

public sealed class SqliteModelStore(SqliteDatabase database) : IModelStore
{
    private const string SummaryColumns = "s.id, m.fitted_at_ms, m.settings_version, m.data_end_ms, m.data_points, m.residual_p_value";

    public Task<StoredModel?> GetAsync(string siteId, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read((connection, transaction) =>
        {
            using var select = connection.Command(transaction, """
                SELECT m.fitted_at_ms, m.fit_duration_ms, m.settings_version, m.data_end_ms, m.data_points, m.residual_p_value, m.model_json, s.key
                FROM site_models m JOIN sites s ON s.key = m.site_key WHERE s.id = $id;
                """).With("$id", siteId);
            using var reader = select.ExecuteReader();
            return reader.Read()
                ? new StoredModel(siteId, reader.GetInt64(7), SqliteExtensions.FromUnixMs(reader.GetInt64(0)), reader.GetDouble(1), reader.GetInt64(2),
                    SqliteExtensions.FromUnixMs(reader.GetInt64(3)), reader.GetInt32(4), reader.GetNullableDouble(5), reader.GetString(6))
                : null;
        }));

    public Task<bool> SaveAsync(StoredModel model, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(model);
        return database.WriteAsync((connection, transaction) =>
        {
            using var upsert = connection.Command(transaction, """
                INSERT INTO site_models (site_key, fitted_at_ms, fit_duration_ms, settings_version, data_end_ms, data_points, residual_p_value, model_json)
                SELECT key, $fitted, $duration, $settings, $end, $points, $p, $json FROM sites WHERE id = $id AND key = $key
                ON CONFLICT (site_key) DO UPDATE SET fitted_at_ms = excluded.fitted_at_ms,
                    fit_duration_ms = excluded.fit_duration_ms, settings_version = excluded.settings_version,
                    data_end_ms = excluded.data_end_ms, data_points = excluded.data_points,
                    residual_p_value = excluded.residual_p_value, model_json = excluded.model_json;
                """)
                .With("$id", model.SiteId)
                .With("$key", model.SiteKey)
                .With("$fitted", model.FittedAt.ToUnixTimeMilliseconds())
                .With("$duration", model.FitDurationMs)
                .With("$settings", model.SettingsVersion)
                .With("$end", model.DataEnd.ToUnixTimeMilliseconds())
                .With("$points", model.DataPoints)
                .With("$p", model.ResidualPValue is { } p && double.IsFinite(p) ? p : null)
                .With("$json", model.ModelJson);
            if (upsert.ExecuteNonQuery() == 0)
            {
                return false;
            }

            WriteAttempt(connection, transaction, new FitAttempt(model.SiteId, model.SiteKey, model.FittedAt, Failed: false, Error: null));
            return true;
        }, cancellationToken);
    }

    public Task<bool> RecordFailureAsync(FitAttempt attempt, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(attempt);
        return database.WriteAsync((connection, transaction) => WriteAttempt(connection, transaction, attempt), cancellationToken);
    }

    public Task<FitAttempt?> GetLastAttemptAsync(string siteId, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read((connection, transaction) =>
        {
            using var select = connection.Command(transaction, """
                SELECT a.attempted_at_ms, a.failed, a.error, s.key
                FROM site_fit_attempts a JOIN sites s ON s.key = a.site_key WHERE s.id = $id;
                """).With("$id", siteId);
            using var reader = select.ExecuteReader();
            return reader.Read()
                ? new FitAttempt(siteId, reader.GetInt64(3), SqliteExtensions.FromUnixMs(reader.GetInt64(0)), reader.GetInt64(1) != 0, reader.GetNullableString(2))
                : null;
        }));

    public Task<IReadOnlyList<ModelSummary>> ListSummariesAsync(CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read<IReadOnlyList<ModelSummary>>((connection, transaction) =>
        {
            using var select = connection.Command(transaction,
                $"SELECT {SummaryColumns} FROM site_models m JOIN sites s ON s.key = m.site_key ORDER BY s.id;");
            using var reader = select.ExecuteReader();
            var list = new List<ModelSummary>();
            while (reader.Read())
            {
                list.Add(ReadSummary(reader));
            }

            return list;
        }));

    public Task<ModelSummary?> GetSummaryAsync(string siteId, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read((connection, transaction) =>
        {
            using var select = connection.Command(transaction,
                $"SELECT {SummaryColumns} FROM site_models m JOIN sites s ON s.key = m.site_key WHERE s.id = $id;").With("$id", siteId);
            using var reader = select.ExecuteReader();
            return reader.Read() ? ReadSummary(reader) : null;
        }));

    private static ModelSummary ReadSummary(SqliteDataReader reader) =>
        new(reader.GetString(0), SqliteExtensions.FromUnixMs(reader.GetInt64(1)), reader.GetInt64(2),
            SqliteExtensions.FromUnixMs(reader.GetInt64(3)), reader.GetInt32(4), reader.GetNullableDouble(5));

    private static bool WriteAttempt(SqliteConnection connection, SqliteTransaction transaction, FitAttempt attempt)
    {
        using var upsert = connection.Command(transaction, """
            INSERT INTO site_fit_attempts (site_key, attempted_at_ms, failed, error)
            SELECT key, $at, $failed, $error FROM sites WHERE id = $id AND key = $key
            ON CONFLICT (site_key) DO UPDATE SET attempted_at_ms = excluded.attempted_at_ms,
                failed = excluded.failed, error = excluded.error;
            """)
            .With("$id", attempt.SiteId)
            .With("$key", attempt.SiteKey)
            .With("$at", attempt.AttemptedAt.ToUnixTimeMilliseconds())
            .With("$failed", attempt.Failed ? 1 : 0)
            .With("$error", attempt.Error);
        return upsert.ExecuteNonQuery() == 1;
    }
}
