using System.Diagnostics;
using System.Globalization;
using System.Text.RegularExpressions;

namespace ForecastHub.Benchmarks;

/// <summary>
/// Fleet refit: N sites x D days of hourly data, no models stored; the server starts, its start-up
/// sweep queues every site, and the clock runs until every site has a model. Then the server is
/// stopped and started again on the same file (models stored, loaded lazily): time to ready.
/// </summary>
internal static partial class FleetBenchmark
{
    public static async Task<int> RunAsync(BenchmarkOptions options, TextWriter output)
    {
        ArgumentNullException.ThrowIfNull(options);
        var dll = ServerProcess.BuildApi();
        var folder = Directory.CreateTempSubdirectory("forecasthub-fleet-");
        var path = Path.Combine(folder.FullName, "fleet.db");
        try
        {
            var seedWatch = Stopwatch.StartNew();
            var now = DateTimeOffset.UtcNow;
            var end = new DateTimeOffset(now.Year, now.Month, now.Day, now.Hour, 0, 0, TimeSpan.Zero);
            await FleetSeeder.SeedAsync(path, options.Sites, options.Days, end);
            output.WriteLine(Invariant($"seeded {options.Sites} sites x {options.Days * 24} hourly readings in {seedWatch.Elapsed.TotalSeconds:F1} s ({new FileInfo(path).Length / 1048576.0:F0} MiB)"));

            double refitSeconds;
            double peakRss;
            bool met;
            await using (var server = ServerProcess.Start(dll, path))
            {
                var watch = Stopwatch.StartNew();
                var ready = await server.WaitReadyAsync(watch, TimeSpan.FromSeconds(60));
                output.WriteLine(Invariant($"first start (no models): ready after {ready.TotalMilliseconds:F0} ms"));
                var fits = 0.0;
                while (fits < options.Sites)
                {
                    await Task.Delay(250);
                    fits = await FitsAsync(server);
                    if (watch.Elapsed > TimeSpan.FromMinutes(10))
                    {
                        throw new TimeoutException($"only {fits} of {options.Sites} sites fitted after 10 minutes");
                    }
                }

                refitSeconds = watch.Elapsed.TotalSeconds;
                peakRss = server.PeakRssMiB();
                output.WriteLine(Invariant($"fleet refit: {options.Sites} sites fitted {refitSeconds:F1} s after start ({options.Sites / refitSeconds:F0} fits/s); peak RSS {peakRss:F0} MiB"));
            }

            await using (var server = ServerProcess.Start(dll, path))
            {
                var watch = Stopwatch.StartNew();
                var ready = await server.WaitReadyAsync(watch, TimeSpan.FromSeconds(60));
                using var forecast = await server.Client.GetAsync(new Uri("/api/v1/sites/site-0000/forecast", UriKind.Relative));
                var firstForecast = watch.Elapsed;
                output.WriteLine(Invariant($"cold start with {options.Sites} stored models: ready after {ready.TotalMilliseconds:F0} ms; first forecast ({(int)forecast.StatusCode}) after {firstForecast.TotalMilliseconds:F0} ms"));
                met = refitSeconds <= 60 && peakRss <= 400 && ready.TotalSeconds <= 3;
                output.WriteLine(Invariant($"targets: refit <= 60 s: {(refitSeconds <= 60 ? "met" : "MISSED")}; peak RSS <= 400 MiB: {(peakRss <= 400 ? "met" : "MISSED")}; ready <= 3 s: {(ready.TotalSeconds <= 3 ? "met" : "MISSED")}"));
            }

            return met ? 0 : 1;
        }
        finally
        {
            Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
            folder.Delete(recursive: true);
        }
    }

    private static async Task<double> FitsAsync(ServerProcess server)
    {
        var text = await server.Client.GetStringAsync(new Uri("/metrics", UriKind.Relative));
        var match = FitsOk().Match(text);
        return match.Success ? double.Parse(match.Groups[1].Value, CultureInfo.InvariantCulture) : 0;
    }

    [GeneratedRegex("""^forecasthub_fits_total\{outcome="ok"\} (\S+)$""", RegexOptions.Multiline)]
    private static partial Regex FitsOk();

    private static string Invariant(FormattableString text) => text.ToString(CultureInfo.InvariantCulture);
}
