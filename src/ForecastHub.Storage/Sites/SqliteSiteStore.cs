using ForecastHub.Core.Quality;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage.Sites;

public sealed class SqliteSiteStore(SqliteDatabase database, TimeProvider clock) : ISiteStore
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
        return database.WriteAsync((connection, transaction) =>
        {
            using var insert = connection.Command(transaction, $"""
                INSERT INTO sites ({Columns})
                VALUES ($id, $name, $tz, $cadence, $daily, $lat, $lon, $elev, $minC, $maxC, $step, $flat,
                        $seasonality, $method, $policy, $maxOrder, $window, $interval, $created, $updated, $version, $thresholds, $nightStart, $nightEnd)
                ON CONFLICT (id) DO NOTHING;
                """);
            Bind(insert, site);
            return insert.ExecuteNonQuery() == 1;
        }, cancellationToken);
    }

    public Task<SiteRecord?> GetAsync(string id, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read((connection, transaction) => Get(connection, transaction, id)));

    public Task<IReadOnlyList<SiteRecord>> ListAsync(string? afterId, int limit, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read<IReadOnlyList<SiteRecord>>((connection, transaction) =>
        {
            using var select = connection.Command(transaction,
                    $"SELECT {Columns}, key FROM sites WHERE id > $after ORDER BY id LIMIT $limit;")
                .With("$after", afterId ?? "")
                .With("$limit", limit);
            using var reader = select.ExecuteReader();
            var sites = new List<SiteRecord>();
            while (reader.Read())
            {
                sites.Add(ReadSite(reader));
            }
            return sites;
        }));

    public Task<SiteRecord?> UpdateAsync(string id, Func<SiteRecord, SiteRecord?> change, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(change);
        return database.WriteAsync((connection, transaction) =>
        {
            var current = Get(connection, transaction, id);
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
            using var write = connection.Command(transaction, """
                UPDATE sites SET name = $name, time_zone = $tz, cadence = $cadence, daily_statistic = $daily,
                    latitude = $lat, longitude = $lon, elevation_m = $elev,
                    min_c = $minC, max_c = $maxC, max_step_c_per_hour = $step, flatline_hours = $flat,
                    seasonality = $seasonality, method = $method, order_policy = $policy, max_order = $maxOrder,
                    fit_window_days = $window, interval_method = $interval,
                    updated_at_ms = $updated, settings_version = $version,
                    thresholds_json = $thresholds, night_start = $nightStart, night_end = $nightEnd
                WHERE id = $id;
                """);
            Bind(write, updated);
            write.ExecuteNonQuery();
            return updated;
        }, cancellationToken);
    }

    public Task<bool> DeleteAsync(string id, CancellationToken cancellationToken = default) =>
        database.WriteAsync((connection, transaction) =>
        {
            using var delete = connection.Command(transaction, "DELETE FROM sites WHERE id = $id;").With("$id", id);
            return delete.ExecuteNonQuery() == 1;
        }, cancellationToken);

    private static SiteRecord? Get(SqliteConnection connection, SqliteTransaction transaction, string id)
    {
        using var select = connection.Command(transaction, $"SELECT {Columns}, key FROM sites WHERE id = $id;").With("$id", id);
        using var reader = select.ExecuteReader();
        return reader.Read() ? ReadSite(reader) : null;
    }

    private static void Bind(SqliteCommand command, SiteRecord site) => command
        .With("$id", site.Id)
        .With("$name", site.Name)
        .With("$tz", site.TimeZone)
        .With("$cadence", SiteColumns.Cadence(site))
        .With("$daily", SiteColumns.DailyStatistic(site))
        .With("$lat", site.Latitude)
        .With("$lon", site.Longitude)
        .With("$elev", site.ElevationM)
        .With("$minC", site.Quality.MinC)
        .With("$maxC", site.Quality.MaxC)
        .With("$step", site.Quality.MaxStepCPerHour)
        .With("$flat", site.Quality.FlatlineHours)
        .With("$seasonality", SiteColumns.Seasonality(site))
        .With("$method", SiteColumns.Method(site))
        .With("$policy", SiteColumns.OrderPolicy(site))
        .With("$maxOrder", site.Model.MaxOrder)
        .With("$window", site.Model.FitWindowDays)
        .With("$interval", SiteColumns.IntervalMethod(site))
        .With("$created", site.CreatedAt.ToUnixTimeMilliseconds())
        .With("$updated", site.UpdatedAt.ToUnixTimeMilliseconds())
        .With("$version", site.SettingsVersion)
        .With("$thresholds", SiteColumns.Thresholds(site))
        .With("$nightStart", SiteColumns.NightStart(site))
        .With("$nightEnd", SiteColumns.NightEnd(site));

    private static SiteRecord ReadSite(SqliteDataReader r) => new(
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
        CreatedAt: SqliteExtensions.FromUnixMs(r.GetInt64(18)),
        UpdatedAt: SqliteExtensions.FromUnixMs(r.GetInt64(19)),
        SettingsVersion: r.GetInt64(20))
    {
        Key = r.GetInt64(24),
        Risk = SiteColumns.ReadRisk(r.GetString(21), r.GetString(22), r.GetString(23)),
    };
}
