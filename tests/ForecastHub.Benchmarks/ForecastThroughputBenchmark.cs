using System.Globalization;
using System.Net;
using System.Text.RegularExpressions;

namespace ForecastHub.Benchmarks;

/// <summary>
/// wrk against GET .../forecast?steps=48&amp;levels=80,95 and against /health/live, one after the
/// other on the same server in the same run, with the same connections and threads. The site has two
/// thresholds, so each answer carries per-step probabilities and the night and next-24-hour risk.
/// </summary>
internal static partial class ForecastThroughputBenchmark
{
    public static async Task<int> RunAsync(BenchmarkOptions options, TextWriter output)
    {
        ArgumentNullException.ThrowIfNull(options);
        var dll = ServerProcess.BuildApi();
        var folder = Directory.CreateTempSubdirectory("forecasthub-wrk-");
        var path = Path.Combine(folder.FullName, "wrk.db");
        try
        {
            var now = DateTimeOffset.UtcNow;
            var end = new DateTimeOffset(now.Year, now.Month, now.Day, now.Hour, 0, 0, TimeSpan.Zero).AddHours(1);
            await FleetSeeder.SeedAsync(path, sites: 1, days: 60, end);
            await using var server = ServerProcess.Start(dll, path, LimitsOff);
            await server.WaitReadyAsync(System.Diagnostics.Stopwatch.StartNew(), TimeSpan.FromSeconds(30));
            using (var refit = await server.Client.PostAsync(new Uri("/api/v1/sites/site-0000/model/refit", UriKind.Relative), null))
            {
                if (refit.StatusCode != HttpStatusCode.OK)
                {
                    throw new InvalidOperationException($"refit answered {(int)refit.StatusCode}: {await refit.Content.ReadAsStringAsync()}");
                }
            }

            using (var thresholds = new StringContent(
                """{"thresholds":[{"id":"frost","direction":"below","valueC":0,"alertProbability":0.3},{"id":"heat","direction":"above","valueC":25}]}""",
                System.Text.Encoding.UTF8, "application/json"))
            using (var patch = await server.Client.PatchAsync(new Uri("/api/v1/sites/site-0000", UriKind.Relative), thresholds))
            {
                if (patch.StatusCode != HttpStatusCode.OK)
                {
                    throw new InvalidOperationException($"setting thresholds answered {(int)patch.StatusCode}: {await patch.Content.ReadAsStringAsync()}");
                }
            }

            var forecastPath = "/api/v1/sites/site-0000/forecast?steps=48&levels=80,95";
            using (var warm = await server.Client.GetAsync(new Uri(forecastPath, UriKind.Relative)))
            {
                var body = await warm.Content.ReadAsStringAsync();
                if (warm.StatusCode != HttpStatusCode.OK)
                {
                    throw new InvalidOperationException($"forecast answered {(int)warm.StatusCode}: {body}");
                }

                using var answer = System.Text.Json.JsonDocument.Parse(body);
                var risks = answer.RootElement.GetProperty("risk").GetArrayLength();
                if (risks != 4)
                {
                    throw new InvalidOperationException($"the forecast carries {risks} risk entries, not 2 thresholds x 2 windows");
                }
            }

            var live = Wrk(new Uri(server.BaseAddress, "/health/live"), options.Seconds);
            var forecast = Wrk(new Uri(server.BaseAddress, forecastPath), options.Seconds);
            output.WriteLine(Invariant($"/health/live: {live.RequestsPerSecond:F0} req/s, p99 {live.P99Ms:F2} ms"));
            output.WriteLine(Invariant($"forecast 48 steps, levels 80,95, 2 thresholds with risk: {forecast.RequestsPerSecond:F0} req/s, p99 {forecast.P99Ms:F2} ms"));
            var ratio = forecast.RequestsPerSecond / live.RequestsPerSecond;
            output.WriteLine(Invariant($"ratio forecast/live {ratio:F2} (target >= 0.5: {(ratio >= 0.5 ? "met" : "MISSED")}); forecast p99 <= 20 ms: {(forecast.P99Ms <= 20 ? "met" : "MISSED")}"));
            return ratio >= 0.5 && forecast.P99Ms <= 20 ? 0 : 1;
        }
        finally
        {
            Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
            folder.Delete(recursive: true);
        }
    }

    /// <summary>Arguments that lift the per-key rate limit for the benchmark's single key.</summary>
    private static readonly string[] LimitsOff = ["--RateLimiting:Enabled=false"];

    private static (double RequestsPerSecond, double P99Ms) Wrk(Uri url, int seconds)
    {
        var output = ServerProcess.Run("wrk",
            $"-t2 -c16 -d{seconds}s --latency -H \"Authorization: Bearer {ServerProcess.AdminKey}\" {url}", Environment.CurrentDirectory);
        var rps = double.Parse(RequestsPerSecond().Match(output).Groups[1].Value, CultureInfo.InvariantCulture);
        var p99 = P99().Match(output);
        var value = double.Parse(p99.Groups[1].Value, CultureInfo.InvariantCulture);
        var ms = p99.Groups[2].Value switch { "us" => value / 1000, "s" => value * 1000, _ => value };
        if (output.Contains("Non-2xx", StringComparison.Ordinal))
        {
            throw new InvalidOperationException("wrk saw non-2xx answers:\n" + output);
        }

        return (rps, ms);
    }

    [GeneratedRegex(@"Requests/sec:\s+([\d.]+)")]
    private static partial Regex RequestsPerSecond();

    [GeneratedRegex(@"99%\s+([\d.]+)(us|ms|s)")]
    private static partial Regex P99();

    private static string Invariant(FormattableString text) => text.ToString(CultureInfo.InvariantCulture);
}
