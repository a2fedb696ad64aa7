using System.Globalization;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Quality;
using ForecastHub.Storage.Migrations;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage;
using ForecastHub.TestData;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Benchmarks;

/// <summary>Writes a database of synthetic hourly sites through the storage layer's own schema.</summary>
internal static class FleetSeeder
{
    public static async Task SeedAsync(string path, int sites, int days, DateTimeOffset end)
    {
        var database = new SqliteDatabase(new StorageOptions { Path = path });
        await new MigrationRunner(database).ApplyAsync();
        var store = new SqliteSiteStore(database, TimeProvider.System);
        var start = end.AddHours(-days * 24);
        for (var s = 0; s < sites; s++)
        {
            var id = string.Create(CultureInfo.InvariantCulture, $"site-{s:0000}");
            var settings = ModelSettings.DefaultFor(GridCadence.Hourly) with { FitWindowDays = 365 };
            await store.CreateAsync(new SiteRecord(id, $"Benchmark site {s}", "Europe/Berlin", GridCadence.Hourly, null, null, null, null,
                QualityLimits.Default, settings, start, start));
            var series = SyntheticSeries.Hourly(start, days * 24, seed: s);
            await database.WriteAsync((connection, transaction) =>
            {
                // Straight into the readings table: the series has no QC faults, and the benchmark is about fitting, not ingestion.
                using var command = connection.CreateCommand();
                command.Transaction = transaction;
                command.CommandText = """
                    INSERT INTO readings (site_key, time_ms, value_c, original_value, original_unit, flags, received_at_ms)
                    SELECT key, $t, $v, $v, 'C', 0, $t FROM sites WHERE id = $id;
                    """;
                var idParameter = command.Parameters.Add("$id", SqliteType.Text);
                var time = command.Parameters.Add("$t", SqliteType.Integer);
                var value = command.Parameters.Add("$v", SqliteType.Real);
                idParameter.Value = id;
                foreach (var (t, v) in series)
                {
                    time.Value = t.ToUnixTimeMilliseconds();
                    value.Value = v;
                    command.ExecuteNonQuery();
                }

                return 0;
            });
        }

        SqliteConnection.ClearAllPools();
    }
}
