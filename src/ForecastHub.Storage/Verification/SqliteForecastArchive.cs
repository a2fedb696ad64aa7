using System.Globalization;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage.Verification;

public sealed class SqliteForecastArchive(SqliteDatabase database) : IForecastArchive
{
    public Task<bool> ArchiveAsync(ArchivedForecast forecast, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(forecast);
        return database.WriteAsync((connection, transaction) =>
        {
            using var insert = connection.Command(transaction, """
                INSERT INTO archived_forecasts (site_key, target_date, issued_at_ms, origin_ms, model_fitted_at_ms, forecast_json)
                SELECT key, $date, $issued, $origin, $fitted, $json FROM sites WHERE id = $id AND key = $key
                ON CONFLICT (site_key, target_date) DO NOTHING;
                """)
                .With("$id", forecast.SiteId)
                .With("$key", forecast.SiteKey)
                .With("$date", Day(forecast.TargetDate))
                .With("$issued", forecast.IssuedAt.ToUnixTimeMilliseconds())
                .With("$origin", forecast.Origin.ToUnixTimeMilliseconds())
                .With("$fitted", forecast.ModelFittedAt.ToUnixTimeMilliseconds())
                .With("$json", forecast.ForecastJson);
            return insert.ExecuteNonQuery() == 1;
        }, cancellationToken);
    }

    public Task<IReadOnlyList<ArchivedForecast>> ListUnscoredAsync(string siteId, int limit, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read<IReadOnlyList<ArchivedForecast>>((connection, transaction) =>
        {
            using var select = connection.Command(transaction, """
                SELECT f.target_date, f.issued_at_ms, f.origin_ms, f.model_fitted_at_ms, f.forecast_json, s.key
                FROM archived_forecasts f JOIN sites s ON s.key = f.site_key
                LEFT JOIN live_scores l ON l.site_key = f.site_key AND l.target_date = f.target_date
                WHERE s.id = $id AND l.site_key IS NULL
                ORDER BY f.target_date LIMIT $limit;
                """).With("$id", siteId).With("$limit", limit);
            using var reader = select.ExecuteReader();
            var list = new List<ArchivedForecast>();
            while (reader.Read())
            {
                list.Add(new ArchivedForecast(siteId, reader.GetInt64(5), ParseDay(reader.GetString(0)), SqliteExtensions.FromUnixMs(reader.GetInt64(1)),
                    SqliteExtensions.FromUnixMs(reader.GetInt64(2)), SqliteExtensions.FromUnixMs(reader.GetInt64(3)), reader.GetString(4)));
            }

            return list;
        }));

    public Task<bool> SaveScoreAsync(LiveScore score, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(score);
        return database.WriteAsync((connection, transaction) =>
        {
            using var upsert = connection.Command(transaction, """
                INSERT INTO live_scores (site_key, target_date, scored_at_ms, scores_json)
                SELECT key, $date, $at, $json FROM sites WHERE id = $id AND key = $key
                ON CONFLICT (site_key, target_date) DO UPDATE SET scored_at_ms = excluded.scored_at_ms, scores_json = excluded.scores_json;
                """)
                .With("$id", score.SiteId)
                .With("$key", score.SiteKey)
                .With("$date", Day(score.TargetDate))
                .With("$at", score.ScoredAt.ToUnixTimeMilliseconds())
                .With("$json", score.ScoresJson);
            return upsert.ExecuteNonQuery() == 1;
        }, cancellationToken);
    }

    public Task<IReadOnlyList<LiveScore>> ListScoresAsync(string siteId, DateOnly fromDate, int limit, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read<IReadOnlyList<LiveScore>>((connection, transaction) =>
        {
            using var select = connection.Command(transaction, """
                SELECT l.target_date, l.scored_at_ms, l.scores_json, s.key
                FROM live_scores l JOIN sites s ON s.key = l.site_key
                WHERE s.id = $id AND l.target_date >= $from
                ORDER BY l.target_date DESC LIMIT $limit;
                """).With("$id", siteId).With("$from", Day(fromDate)).With("$limit", limit);
            using var reader = select.ExecuteReader();
            var list = new List<LiveScore>();
            while (reader.Read())
            {
                list.Add(new LiveScore(siteId, reader.GetInt64(3), ParseDay(reader.GetString(0)), SqliteExtensions.FromUnixMs(reader.GetInt64(1)), reader.GetString(2)));
            }

            return list;
        }));

    public Task<bool> HasArchivedAsync(string siteId, DateOnly targetDate, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read((connection, transaction) =>
        {
            using var select = connection.Command(transaction, """
                SELECT count(*) FROM archived_forecasts f JOIN sites s ON s.key = f.site_key
                WHERE s.id = $id AND f.target_date = $date;
                """).With("$id", siteId).With("$date", Day(targetDate));
            return Convert.ToInt64(select.ExecuteScalar(), CultureInfo.InvariantCulture) > 0;
        }));

    // ISO dates sort as text, so the primary key orders days.
    private static string Day(DateOnly date) => date.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);

    private static DateOnly ParseDay(string text) => DateOnly.ParseExact(text, "yyyy-MM-dd", CultureInfo.InvariantCulture);
}
