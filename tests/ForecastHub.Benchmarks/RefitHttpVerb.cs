using System.Diagnostics;
using System.Globalization;
using System.Net.Http.Json;
using System.Text;
using System.Text.Json;

namespace ForecastHub.Benchmarks;

/// <summary>
/// <c>POST /api/v1/sites/{id}/model/refit</c> through the service (Release build, child process, its own
/// SQLite file) on the fit benchmark's 87,600 hourly points, shifted to end at the current hour so the
/// whole series lies in the site's fit window (maxOrder 48, fitWindowDays 3660, default settings
/// otherwise: pacf-aic, Burg, calibrated intervals). Times the whole request and prints the answer's
/// <c>fitDurationMs</c> beside it; the rest is reading the rows, the grid, storing and HTTP.
/// </summary>
internal sealed class RefitHttpVerb : IBenchmarkVerb
{
    private const string SiteId = "bench-10y";
    private const int BatchSize = 40_000;
    private const int WarmupRefits = 3;
    private const int TimedRefits = 7;

    public string Name => "refit-http";

    public string Description => "POST .../model/refit of 87,600 hourly points through the service, with fitDurationMs beside it";

    public int Run(TextWriter output) => RunAsync(output).GetAwaiter().GetResult();

    private static async Task<int> RunAsync(TextWriter output)
    {
        var apiDll = ServerProcess.BuildApi();
        var folder = Directory.CreateTempSubdirectory("forecasthub-refit-");
        try
        {
            await using var server = ServerProcess.Start(apiDll, Path.Combine(folder.FullName, "refit.db"), "--RateLimiting:Enabled=false");
            await server.WaitReadyAsync(Stopwatch.StartNew(), TimeSpan.FromMinutes(2));
            var client = server.Client;

            using (var created = await client.PostAsJsonAsync(new Uri("/api/v1/sites", UriKind.Relative), new
            {
                id = SiteId,
                name = "Ten years hourly",
                timeZone = "Europe/Berlin",
                cadence = "hourly",
                model = new { maxOrder = 48, fitWindowDays = 3660 },
            }))
            {
                created.EnsureSuccessStatusCode();
            }

            var grid = Series.SeasonalHourlyGrid(FitVerb.Hours, seed: 2026);
            var now = DateTimeOffset.UtcNow;
            var shift = new DateTimeOffset(now.Year, now.Month, now.Day, now.Hour, 0, 0, TimeSpan.Zero).AddHours(-1) - grid.Times[^1];
            for (var start = 0; start < grid.Count; start += BatchSize)
            {
                var body = new StringBuilder("{\"unit\":\"C\",\"readings\":[");
                for (var i = start; i < Math.Min(grid.Count, start + BatchSize); i++)
                {
                    body.Append(i == start ? "" : ",").Append(CultureInfo.InvariantCulture,
                        $"{{\"time\":\"{(grid.Times[i] + shift).ToString("yyyy-MM-dd'T'HH:mm:ss'Z'", CultureInfo.InvariantCulture)}\",\"value\":{grid.Values[i].ToString("R", CultureInfo.InvariantCulture)}}}");
                }

                using var content = new StringContent(body.Append("]}").ToString(), Encoding.UTF8, "application/json");
                using var posted = await client.PostAsync(new Uri($"/api/v1/sites/{SiteId}/observations", UriKind.Relative), content);
                posted.EnsureSuccessStatusCode();
            }

            // The first refits include the background fit queued by the posts (the site lock serialises them) and tier-up of the code.
            for (var i = 0; i < WarmupRefits; i++)
            {
                await RefitAsync(client);
            }

            var runs = new List<(double RequestMs, double FitMs)>();
            for (var i = 0; i < TimedRefits; i++)
            {
                runs.Add(await RefitAsync(client));
            }

            var request = Median(runs.Select(r => r.RequestMs));
            var fit = Median(runs.Select(r => r.FitMs));
            output.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"refit over HTTP: median {request:F1} ms per request (min {runs.Min(r => r.RequestMs):F1}), fitDurationMs median {fit:F1}, outside the fit {request - fit:F1} ms, over {TimedRefits} refits"));
            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"RESULT refit_ms={request:F1} refit_fit_ms={fit:F1}"));
            return 0;
        }
        finally
        {
            Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
            folder.Delete(recursive: true);
        }
    }

    private static async Task<(double RequestMs, double FitMs)> RefitAsync(HttpClient client)
    {
        var watch = Stopwatch.StartNew();
        using var response = await client.PostAsync(new Uri($"/api/v1/sites/{SiteId}/model/refit", UriKind.Relative), null);
        var body = await response.Content.ReadAsByteArrayAsync();
        watch.Stop();
        response.EnsureSuccessStatusCode();
        using var answer = JsonDocument.Parse(body);
        return (watch.Elapsed.TotalMilliseconds, answer.RootElement.GetProperty("fitDurationMs").GetDouble());
    }

    private static double Median(IEnumerable<double> values)
    {
        var sorted = values.Order().ToArray();
        return sorted.Length % 2 == 1 ? sorted[sorted.Length / 2] : (sorted[(sorted.Length / 2) - 1] + sorted[sorted.Length / 2]) / 2;
    }
}
