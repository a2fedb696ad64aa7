using ForecastHub.Storage.Postgres.Cluster;
using ForecastHub.Storage.Verification;

namespace ForecastHub.Storage.Postgres.Verification;

public sealed class PostgresForecastArchive(PostgresDatabase database) : IForecastArchive
{
    public Task<bool> ArchiveAsync(ArchivedForecast forecast, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(forecast);
        return database.QueryAsync(async connection =>
        {
            await using var insert = connection.Command(null, """
                INSERT INTO archived_forecasts (site_key, target_date, issued_at_ms, origin_ms, model_fitted_at_ms, forecast_json)
                SELECT key, $2, $3, $4, $5, $6 FROM sites WHERE id = $1 AND key = $7
                ON CONFLICT (site_key, target_date) DO NOTHING;
                """)
                .With(forecast.SiteId)
                .With(forecast.TargetDate)
                .With(forecast.IssuedAt.ToUnixTimeMilliseconds())
                .With(forecast.Origin.ToUnixTimeMilliseconds())
                .With(forecast.ModelFittedAt.ToUnixTimeMilliseconds())
                .With(forecast.ForecastJson)
                .With(forecast.SiteKey);
            return await insert.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false) == 1;
        }, cancellationToken);
    }

    public Task<IReadOnlyList<ArchivedForecast>> ListUnscoredAsync(string siteId, int limit, CancellationToken cancellationToken = default) =>
        database.QueryAsync<IReadOnlyList<ArchivedForecast>>(async connection =>
        {
            await using var select = connection.Command(null, """
                SELECT f.target_date, f.issued_at_ms, f.origin_ms, f.model_fitted_at_ms, f.forecast_json, s.key
                FROM archived_forecasts f JOIN sites s ON s.key = f.site_key
                LEFT JOIN live_scores l ON l.site_key = f.site_key AND l.target_date = f.target_date
                WHERE s.id = $1 AND l.site_key IS NULL
                ORDER BY f.target_date LIMIT $2;
                """).With(siteId).With(limit);
            await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
            var list = new List<ArchivedForecast>();
            while (await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
            {
                list.Add(new ArchivedForecast(siteId, reader.GetInt64(5), reader.GetFieldValue<DateOnly>(0), NpgsqlExtensions.FromUnixMs(reader.GetInt64(1)),
                    NpgsqlExtensions.FromUnixMs(reader.GetInt64(2)), NpgsqlExtensions.FromUnixMs(reader.GetInt64(3)), reader.GetString(4)));
            }
            return list;
        }, cancellationToken);

    public Task<bool> SaveScoreAsync(LiveScore score, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(score);
        return database.WriteAsync(async (connection, transaction) =>
        {
            await using var upsert = connection.Command(transaction, """
                INSERT INTO live_scores (site_key, target_date, scored_at_ms, scores_json)
                SELECT key, $2, $3, $4 FROM sites WHERE id = $1 AND key = $5
                ON CONFLICT (site_key, target_date) DO UPDATE SET scored_at_ms = excluded.scored_at_ms, scores_json = excluded.scores_json;
                """)
                .With(score.SiteId)
                .With(score.TargetDate)
                .With(score.ScoredAt.ToUnixTimeMilliseconds())
                .With(score.ScoresJson)
                .With(score.SiteKey);
            if (await upsert.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false) != 1)
            {
                return false;
            }
            // Scores are part of what a site's cached answers show.
            await new ChangeNotice(ChangeKind.Model, score.SiteId).SendAsync(connection, transaction, cancellationToken).ConfigureAwait(false);
            return true;
        }, cancellationToken);
    }

    public Task<IReadOnlyList<LiveScore>> ListScoresAsync(string siteId, DateOnly fromDate, int limit, CancellationToken cancellationToken = default) =>
        database.QueryAsync<IReadOnlyList<LiveScore>>(async connection =>
        {
            await using var select = connection.Command(null, """
                SELECT l.target_date, l.scored_at_ms, l.scores_json, s.key
                FROM live_scores l JOIN sites s ON s.key = l.site_key
                WHERE s.id = $1 AND l.target_date >= $2
                ORDER BY l.target_date DESC LIMIT $3;
                """).With(siteId).With(fromDate).With(limit);
            await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
            var list = new List<LiveScore>();
            while (await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
            {
                list.Add(new LiveScore(siteId, reader.GetInt64(3), reader.GetFieldValue<DateOnly>(0), NpgsqlExtensions.FromUnixMs(reader.GetInt64(1)), reader.GetString(2)));
            }
            return list;
        }, cancellationToken);

    public Task<bool> HasArchivedAsync(string siteId, DateOnly targetDate, CancellationToken cancellationToken = default) =>
        database.QueryAsync(async connection =>
        {
            await using var select = connection.Command(null, """
                SELECT EXISTS (SELECT 1 FROM archived_forecasts f JOIN sites s ON s.key = f.site_key
                WHERE s.id = $1 AND f.target_date = $2);
                """).With(siteId).With(targetDate);
            return (bool)(await select.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false))!;
        }, cancellationToken);
}
