using ForecastHub.Storage.Models;
using ForecastHub.Storage.Postgres.Cluster;
using Npgsql;

namespace ForecastHub.Storage.Postgres.Models;

public sealed class PostgresModelStore(PostgresDatabase database) : IModelStore
{
    private const string SummaryColumns = "s.id, m.fitted_at_ms, m.settings_version, m.data_end_ms, m.data_points, m.residual_p_value";

    public Task<StoredModel?> GetAsync(string siteId, CancellationToken cancellationToken = default) =>
        database.QueryAsync(async connection =>
        {
            await using var select = connection.Command(null, """
                SELECT m.fitted_at_ms, m.fit_duration_ms, m.settings_version, m.data_end_ms, m.data_points, m.residual_p_value, m.model_json, s.key
                FROM site_models m JOIN sites s ON s.key = m.site_key WHERE s.id = $1;
                """).With(siteId);
            await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
            return await reader.ReadAsync(cancellationToken).ConfigureAwait(false)
                ? new StoredModel(siteId, reader.GetInt64(7), NpgsqlExtensions.FromUnixMs(reader.GetInt64(0)), reader.GetDouble(1), reader.GetInt64(2),
                    NpgsqlExtensions.FromUnixMs(reader.GetInt64(3)), reader.GetInt32(4), reader.GetNullableDouble(5), reader.GetString(6))
                : null;
        }, cancellationToken);

    public Task<bool> SaveAsync(StoredModel model, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(model);
        return database.WriteAsync(async (connection, transaction) =>
        {
            await using var upsert = connection.Command(transaction, """
                INSERT INTO site_models (site_key, fitted_at_ms, fit_duration_ms, settings_version, data_end_ms, data_points, residual_p_value, model_json)
                SELECT key, $2, $3, $4, $5, $6, $7, $8 FROM sites WHERE id = $1 AND key = $9
                ON CONFLICT (site_key) DO UPDATE SET fitted_at_ms = excluded.fitted_at_ms,
                    fit_duration_ms = excluded.fit_duration_ms, settings_version = excluded.settings_version,
                    data_end_ms = excluded.data_end_ms, data_points = excluded.data_points,
                    residual_p_value = excluded.residual_p_value, model_json = excluded.model_json;
                """)
                .With(model.SiteId)
                .With(model.FittedAt.ToUnixTimeMilliseconds())
                .With(model.FitDurationMs)
                .With(model.SettingsVersion)
                .With(model.DataEnd.ToUnixTimeMilliseconds())
                .With(model.DataPoints)
                .With<double?>(model.ResidualPValue is { } p && double.IsFinite(p) ? p : null, NpgsqlTypes.NpgsqlDbType.Double)
                .With(model.ModelJson)
                .With(model.SiteKey);
            if (await upsert.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false) == 0)
            {
                return false;
            }
            return await WriteAttemptAsync(connection, transaction, new FitAttempt(model.SiteId, model.SiteKey, model.FittedAt, Failed: false, Error: null), cancellationToken)
                .ConfigureAwait(false);
        }, cancellationToken);
    }

    public Task<bool> RecordFailureAsync(FitAttempt attempt, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(attempt);
        return database.WriteAsync((connection, transaction) => WriteAttemptAsync(connection, transaction, attempt, cancellationToken), cancellationToken);
    }

    public Task<FitAttempt?> GetLastAttemptAsync(string siteId, CancellationToken cancellationToken = default) =>
        database.QueryAsync(async connection =>
        {
            await using var select = connection.Command(null, """
                SELECT a.attempted_at_ms, a.failed, a.error, s.key
                FROM site_fit_attempts a JOIN sites s ON s.key = a.site_key WHERE s.id = $1;
                """).With(siteId);
            await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
            return await reader.ReadAsync(cancellationToken).ConfigureAwait(false)
                ? new FitAttempt(siteId, reader.GetInt64(3), NpgsqlExtensions.FromUnixMs(reader.GetInt64(0)), reader.GetBoolean(1), reader.GetNullableString(2))
                : null;
        }, cancellationToken);

    public Task<IReadOnlyList<ModelSummary>> ListSummariesAsync(CancellationToken cancellationToken = default) =>
        database.QueryAsync<IReadOnlyList<ModelSummary>>(async connection =>
        {
            await using var select = connection.Command(null,
                $"SELECT {SummaryColumns} FROM site_models m JOIN sites s ON s.key = m.site_key ORDER BY s.id;");
            await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
            var list = new List<ModelSummary>();
            while (await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
            {
                list.Add(ReadSummary(reader));
            }
            return list;
        }, cancellationToken);

    public Task<ModelSummary?> GetSummaryAsync(string siteId, CancellationToken cancellationToken = default) =>
        database.QueryAsync(async connection =>
        {
            await using var select = connection.Command(null,
                $"SELECT {SummaryColumns} FROM site_models m JOIN sites s ON s.key = m.site_key WHERE s.id = $1;").With(siteId);
            await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
            return await reader.ReadAsync(cancellationToken).ConfigureAwait(false) ? ReadSummary(reader) : null;
        }, cancellationToken);

    private static ModelSummary ReadSummary(NpgsqlDataReader reader) =>
        new(reader.GetString(0), NpgsqlExtensions.FromUnixMs(reader.GetInt64(1)), reader.GetInt64(2),
            NpgsqlExtensions.FromUnixMs(reader.GetInt64(3)), reader.GetInt32(4), reader.GetNullableDouble(5));

    private static async Task<bool> WriteAttemptAsync(NpgsqlConnection connection, NpgsqlTransaction transaction, FitAttempt attempt,
        CancellationToken cancellationToken)
    {
        await using var upsert = connection.Command(transaction, """
            INSERT INTO site_fit_attempts (site_key, attempted_at_ms, failed, error)
            SELECT key, $2, $3, $4 FROM sites WHERE id = $1 AND key = $5
            ON CONFLICT (site_key) DO UPDATE SET attempted_at_ms = excluded.attempted_at_ms,
                failed = excluded.failed, error = excluded.error;
            """)
            .With(attempt.SiteId)
            .With(attempt.AttemptedAt.ToUnixTimeMilliseconds())
            .With(attempt.Failed)
            .With(attempt.Error, NpgsqlTypes.NpgsqlDbType.Text)
            .With(attempt.SiteKey);
        if (await upsert.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false) != 1)
        {
            return false;
        }
        await new ChangeNotice(ChangeKind.Model, attempt.SiteId).SendAsync(connection, transaction, cancellationToken).ConfigureAwait(false);
        return true;
    }
}
