using ForecastHub.Core.Quality;
using ForecastHub.Storage.Postgres.Cluster;
using ForecastHub.Storage.Sites;
using Npgsql;

namespace ForecastHub.Storage.Postgres.Sites;

public sealed class PostgresSiteStore(PostgresDatabase database, TimeProvider clock) : ISiteStore
{
    private const string Columns = """
        id, name, time_zone, cadence, daily_statistic, latitude, longitude, elevation_m,
        min_c, max_c, max_step_c_per_hour, flatline_hours,
        seasonality, method, order_policy, max_order, fit_window_days, interval_method,
        created_at_ms, updated_at_ms, settings_version, thresholds_json, night_start, night_end
        """;

    public Task<bool> CreateAsync(SiteRecord site, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(site);
        return database.WriteAsync(async (connection, transaction) =>
        {
            await using var insert = Bind(connection.Command(transaction, $"""
                INSERT INTO sites ({Columns})
                VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12, $13, $14, $15, $16, $17, $18, $19, $20, $21, $22, $23, $24)
                ON CONFLICT (id) DO NOTHING;
                """), site);
            var created = await insert.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false) == 1;
            if (created)
            {
                await new ChangeNotice(ChangeKind.Site, site.Id).SendAsync(connection, transaction, cancellationToken).ConfigureAwait(false);
            }
            return created;
        }, cancellationToken);
    }

    public Task<SiteRecord?> GetAsync(string id, CancellationToken cancellationToken = default) =>
        database.QueryAsync(connection => GetAsync(connection, null, id, lockRow: false, cancellationToken), cancellationToken);

    public Task<IReadOnlyList<SiteRecord>> ListAsync(string? afterId, int limit, CancellationToken cancellationToken = default) =>
        database.QueryAsync<IReadOnlyList<SiteRecord>>(async connection =>
        {
            await using var select = connection.Command(null, $"SELECT {Columns}, key FROM sites WHERE id > $1 ORDER BY id LIMIT $2;")
                .With(afterId ?? "").With(limit);
            await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
            var sites = new List<SiteRecord>();
            while (await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
            {
                sites.Add(ReadSite(reader));
            }
            return sites;
        }, cancellationToken);

    public Task<SiteRecord?> UpdateAsync(string id, Func<SiteRecord, SiteRecord?> change, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(change);
        return database.WriteAsync(async (connection, transaction) =>
        {
            // The row lock makes read-change-write one step across nodes.
            var current = await GetAsync(connection, transaction, id, lockRow: true, cancellationToken).ConfigureAwait(false);
            if (current is null)
            {
                return null;
            }
            var proposed = change(current);
            if (proposed is null || proposed == current)
            {
                return current;
            }
            var updated = current.UpdatedTo(proposed, clock.GetUtcNow());
            await using var write = Bind(connection.Command(transaction, """
                UPDATE sites SET name = $2, time_zone = $3, cadence = $4, daily_statistic = $5,
                    latitude = $6, longitude = $7, elevation_m = $8,
                    min_c = $9, max_c = $10, max_step_c_per_hour = $11, flatline_hours = $12,
                    seasonality = $13, method = $14, order_policy = $15, max_order = $16,
                    fit_window_days = $17, interval_method = $18,
                    updated_at_ms = $20, settings_version = $21,
                    thresholds_json = $22, night_start = $23, night_end = $24
                WHERE id = $1 AND created_at_ms = $19;
                """), updated);
            await write.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
            await new ChangeNotice(ChangeKind.Site, id).SendAsync(connection, transaction, cancellationToken).ConfigureAwait(false);
            return updated;
        }, cancellationToken);
    }

    public Task<bool> DeleteAsync(string id, CancellationToken cancellationToken = default) =>
        database.WriteAsync(async (connection, transaction) =>
        {
            await using var delete = connection.Command(transaction, "DELETE FROM sites WHERE id = $1;").With(id);
            var deleted = await delete.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false) == 1;
            if (deleted)
            {
                await new ChangeNotice(ChangeKind.Site, id).SendAsync(connection, transaction, cancellationToken).ConfigureAwait(false);
            }
            return deleted;
        }, cancellationToken);

    private static async Task<SiteRecord?> GetAsync(NpgsqlConnection connection, NpgsqlTransaction? transaction, string id, bool lockRow,
        CancellationToken cancellationToken)
    {
        await using var select = connection.Command(transaction,
            $"SELECT {Columns}, key FROM sites WHERE id = $1{(lockRow ? " FOR NO KEY UPDATE" : "")};").With(id);
        await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
        return await reader.ReadAsync(cancellationToken).ConfigureAwait(false) ? ReadSite(reader) : null;
    }

    // Positions $1..$24 follow Columns.
    private static NpgsqlCommand Bind(NpgsqlCommand command, SiteRecord site) => command
        .With(site.Id)
        .With(site.Name)
        .With(site.TimeZone)
        .With(SiteColumns.Cadence(site))
        .With(SiteColumns.DailyStatistic(site), NpgsqlTypes.NpgsqlDbType.Text)
        .With(site.Latitude, NpgsqlTypes.NpgsqlDbType.Double)
        .With(site.Longitude, NpgsqlTypes.NpgsqlDbType.Double)
        .With(site.ElevationM, NpgsqlTypes.NpgsqlDbType.Double)
        .With(site.Quality.MinC)
        .With(site.Quality.MaxC)
        .With(site.Quality.MaxStepCPerHour)
        .With(site.Quality.FlatlineHours)
        .With(SiteColumns.Seasonality(site))
        .With(SiteColumns.Method(site))
        .With(SiteColumns.OrderPolicy(site))
        .With(site.Model.MaxOrder)
        .With(site.Model.FitWindowDays)
        .With(SiteColumns.IntervalMethod(site))
        .With(site.CreatedAt.ToUnixTimeMilliseconds())
        .With(site.UpdatedAt.ToUnixTimeMilliseconds())
        .With(site.SettingsVersion)
        .With(SiteColumns.Thresholds(site))
        .With(SiteColumns.NightStart(site))
        .With(SiteColumns.NightEnd(site));

    private static SiteRecord ReadSite(NpgsqlDataReader r) => new(
        Id: r.GetString(0),
        Name: r.GetString(1),
        TimeZone: r.GetString(2),
        Cadence: SiteColumns.ReadCadence(r.GetString(3)),
        DailyStatistic: SiteColumns.ReadDailyStatistic(r.GetNullableString(4)),
        Latitude: r.GetNullableDouble(5),
        Longitude: r.GetNullableDouble(6),
        ElevationM: r.GetNullableDouble(7),
        Quality: new QualityLimits(r.GetDouble(8), r.GetDouble(9), r.GetDouble(10), r.GetDouble(11)),
        Model: SiteColumns.ReadModel(r.GetString(12), r.GetString(13), r.GetString(14), r.GetInt32(15), r.GetInt32(16), r.GetString(17)),
        CreatedAt: NpgsqlExtensions.FromUnixMs(r.GetInt64(18)),
        UpdatedAt: NpgsqlExtensions.FromUnixMs(r.GetInt64(19)),
        SettingsVersion: r.GetInt64(20))
    {
        Key = r.GetInt64(24),
        Risk = SiteColumns.ReadRisk(r.GetString(21), r.GetString(22), r.GetString(23)),
    };
}
