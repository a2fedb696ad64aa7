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
                met = Verdict(options, refitSeconds, peakRss, ready, output);
            }

            return met ? 0 : 1;
        }
        finally
        {
            Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
            folder.Delete(recursive: true);
        }
    }

    /// <summary>
    /// The targets are for 1,000 sites x 365 days. A smaller run is judged on the refit time scaled by
    /// its share of the work (fits cost about the same per site-year); RSS and cold start are not
    /// judged, since neither scales in proportion.
    /// </summary>
    private static bool Verdict(BenchmarkOptions options, double refitSeconds, double peakRss, TimeSpan ready, TextWriter output)
    {
        static string Mark(bool ok) => ok ? "met" : "MISSED";
        if (options.Sites >= 1000 && options.Days >= 365)
        {
            output.WriteLine(Invariant($"targets: refit <= 60 s: {Mark(refitSeconds <= 60)}; peak RSS <= 400 MiB: {Mark(peakRss <= 400)}; ready <= 3 s: {Mark(ready.TotalSeconds <= 3)}"));
            return refitSeconds <= 60 && peakRss <= 400 && ready.TotalSeconds <= 3;
        }

        var share = options.Sites / 1000.0 * (options.Days / 365.0);
        var refitTarget = 60 * share;
        output.WriteLine(Invariant($"targets (scaled to {options.Sites} sites x {options.Days} days, {share:P1} of the target's work): refit <= {refitTarget:F1} s: {Mark(refitSeconds <= refitTarget)}; peak RSS <= 400 MiB and ready <= 3 s: not applicable (defined for 1,000 sites x 365 days)"));
        return refitSeconds <= refitTarget;
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
