using System.Diagnostics;
using System.Globalization;
using System.Net.Http.Json;
using System.Text;
using System.Text.Json;
using ForecastHub.Api.Models;
using ForecastHub.Core.Modeling;
using ForecastHub.Storage;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Benchmarks;

/// <summary>
/// <c>POST /api/v1/sites/{id}/model/refit</c> through the service (Release build, child process, its own
/// SQLite file) on the fit benchmark's 87,600 hourly points, shifted to end at the current hour so the
/// whole series lies in the site's fit window (maxOrder 48, fitWindowDays 3660, default settings
/// otherwise: pacf-aic, Burg, calibrated intervals). Times the whole request and prints the answer's
/// <c>fitDurationMs</c> beside it, three ways: as a logger's site meets it, each refit after one new hourly reading
/// (the calibration table is carried, Calibration.CanCarry); with <c>Refit:CalibrationCarry</c> zero, so every refit
/// rebuilds the table (two fold fits and 3,000 origins); and with the site switched to Gaussian intervals (no table:
/// the numerics R's comparison runs). Then, with the server stopped, times the steps of a refit one by one in process
/// on the same file (rows, grid, fit without calibration, with a carried and with a rebuilt table, model JSON, store).
/// </summary>
internal sealed class RefitHttpVerb : IBenchmarkVerb
{
    private const string SiteId = "bench-10y";
    private const int BatchSize = 40_000;
    // A server refits every site about daily, so its refit code runs optimised: the runtime compiles a method
    // optimised after 30 calls of quick code and 30 instrumented ones, hence 60 untimed refits first.
    private const int WarmupRefits = 60;
    private const int TimedRefits = 9;
    private const string CarriedNote = "Interval calibration carried";

    public string Name => "refit-http";

    public string Description => "POST .../model/refit of 87,600 hourly points through the service, with fitDurationMs beside it";

    public int Run(TextWriter output) => RunAsync(output).GetAwaiter().GetResult();

    private static async Task<int> RunAsync(TextWriter output)
    {
        var apiDll = ServerProcess.BuildApi();
        var folder = Directory.CreateTempSubdirectory("forecasthub-refit-");
        try
        {
            var databasePath = Path.Combine(folder.FullName, "refit.db");
            var (carried, rebuilt, gaussian) = await TimeRequestsAsync(apiDll, databasePath);
            output.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"refit over HTTP, each after one new hourly reading (default settings; {carried.Carried} of {TimedRefits} carried the calibration table): median {carried.Median:F1} ms per request (min {carried.Min:F1}), fitDurationMs median {carried.FitMs:F1}"));
            output.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"refit over HTTP with Refit:CalibrationCarry 0 (every refit rebuilds the table; {rebuilt.Carried} of {TimedRefits} carried): median {rebuilt.Median:F1} ms per request (min {rebuilt.Min:F1}), fitDurationMs median {rebuilt.FitMs:F1}"));
            output.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"refit over HTTP with intervalMethod gaussian (no table: the numerics R's comparison runs): median {gaussian.Median:F1} ms per request (min {gaussian.Min:F1})"));
            var stages = await TimeStagesAsync(databasePath);
            output.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"stages in process (median of {TimedRefits}, same file, server stopped): read rows {stages.Read:F1} ms (the window held by the window row cache: {stages.HeldRead:F2} ms), grid {stages.Grid:F1} ms, " +
                $"fit without calibration {stages.GaussianFit:F1} ms, with the table carried {stages.CarriedFit:F1} ms, with it rebuilt {stages.RebuiltFit:F1} ms, model JSON {stages.Json:F1} ms, store {stages.Store:F1} ms"));
            output.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"RESULT refit_ms={carried.Median:F1} refit_fit_ms={carried.FitMs:F1} refit_rebuild_ms={rebuilt.Median:F1} refit_gaussian_ms={gaussian.Median:F1} read_ms={stages.Read:F1} held_read_ms={stages.HeldRead:F2} grid_ms={stages.Grid:F1} fit_gaussian_ms={stages.GaussianFit:F1} fit_carried_ms={stages.CarriedFit:F1} fit_rebuilt_ms={stages.RebuiltFit:F1} json_ms={stages.Json:F1} store_ms={stages.Store:F1}"));
            return carried.Carried == TimedRefits && rebuilt.Carried == 0 ? 0 : 1;
        }
        finally
        {
            Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
            folder.Delete(recursive: true);
        }
    }

    private sealed record Timings(double Median, double Min, double FitMs, int Carried);

    private static async Task<(Timings Carried, Timings Rebuilt, Timings Gaussian)> TimeRequestsAsync(string apiDll, string databasePath)
    {
        var grid = Series.SeasonalHourlyGrid(FitVerb.Hours, seed: 2026);
        var now = DateTimeOffset.UtcNow;
        var shift = new DateTimeOffset(now.Year, now.Month, now.Day, now.Hour, 0, 0, TimeSpan.Zero).AddHours(-1) - grid.Times[^1];
        string Reading(int i) => string.Create(CultureInfo.InvariantCulture,
            $"{{\"time\":\"{(grid.Times[i] + shift).ToString("yyyy-MM-dd'T'HH:mm:ss'Z'", CultureInfo.InvariantCulture)}\",\"value\":{grid.Values[i].ToString("R", CultureInfo.InvariantCulture)}}}");

        Timings carried;
        await using (var server = ServerProcess.Start(apiDll, databasePath, "--RateLimiting:Enabled=false"))
        {
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

            // The newest hours are held back: each timed refit follows the post of the next one, as a logger's site meets it.
            var seeded = grid.Count - TimedRefits;
            for (var start = 0; start < seeded; start += BatchSize)
            {
                await PostAsync(client, Enumerable.Range(start, Math.Min(seeded, start + BatchSize) - start).Select(Reading));
            }

            var next = seeded;
            carried = await TimeRefitsAsync(server, client, () => PostAsync(client, [Reading(next++)]));
        }

        // The same file and data, every refit rebuilding its table; then Gaussian intervals.
        await using (var server = ServerProcess.Start(apiDll, databasePath, "--RateLimiting:Enabled=false", "--Refit:CalibrationCarry=00:00:00"))
        {
            await server.WaitReadyAsync(Stopwatch.StartNew(), TimeSpan.FromMinutes(2));
            var client = server.Client;
            var rebuilt = await TimeRefitsAsync(server, client, () => Task.CompletedTask);
            using (var patch = new HttpRequestMessage(HttpMethod.Patch, new Uri($"/api/v1/sites/{SiteId}", UriKind.Relative))
            {
                Content = JsonContent.Create(new { model = new { maxOrder = 48, fitWindowDays = 3660, intervalMethod = "gaussian" } }),
            })
            using (var patched = await client.SendAsync(patch))
            {
                patched.EnsureSuccessStatusCode();
            }

            return (carried, rebuilt, await TimeRefitsAsync(server, client, () => Task.CompletedTask));
        }
    }

    private static async Task PostAsync(HttpClient client, IEnumerable<string> readings)
    {
        using var content = new StringContent("{\"unit\":\"C\",\"readings\":[" + string.Join(',', readings) + "]}", Encoding.UTF8, "application/json");
        using var posted = await client.PostAsync(new Uri($"/api/v1/sites/{SiteId}/observations", UriKind.Relative), content);
        posted.EnsureSuccessStatusCode();
    }

    /// <summary>Untimed refits first, then the timed ones, each after <paramref name="beforeTimed"/> (untimed).</summary>
    private static async Task<Timings> TimeRefitsAsync(ServerProcess server, HttpClient client, Func<Task> beforeTimed)
    {
        // The first refits include the background fit queued by the posts or a settings change (the site lock serialises
        // them) and tier-up of the code.
        for (var i = 0; i < WarmupRefits; i++)
        {
            await RefitAsync(client);
        }

        // Each timed refit meets a service at rest: the work the last one set off (its forecast and alert evaluation) is done.
        var runs = new List<(double RequestMs, double FitMs, bool Carried)>();
        for (var i = 0; i < TimedRefits; i++)
        {
            await beforeTimed();
            await ServerProcess.WaitUntilIdleAsync(server.Pid, TimeSpan.FromMilliseconds(250), 0.01, TimeSpan.FromSeconds(10));
            runs.Add(await RefitAsync(client));
        }

        return new Timings(Median(runs.Select(r => r.RequestMs)), runs.Min(r => r.RequestMs), Median(runs.Select(r => r.FitMs)), runs.Count(r => r.Carried));
    }

    /// <summary>The steps of a refit (ModelService.RefitIfDueAsync) one by one on the file the server left, after as many
    /// untimed rounds as the server had:
    /// the window's rows in the service's pages, the same rows through the window row cache (held from the third round on: kept on a site's second miss), the grid, the core fit without a calibration table, with the table
    /// carried from the round before and with it rebuilt (the calibration folds), the model JSON and the store's save.</summary>
    private static async Task<(double Read, double Grid, double GaussianFit, double CarriedFit, double RebuiltFit, double Json, double Store, double HeldRead)> TimeStagesAsync(string databasePath)
    {
        using var database = new SqliteDatabase(new StorageOptions { Path = databasePath });
        var site = (await new SqliteSiteStore(database, TimeProvider.System).GetAsync(SiteId))!;
        var readings = new SqliteReadingStore(database);
        var loader = new SiteGridLoader(readings, new SqliteReadingSummaryStore(database));
        var fitWindows = new WindowRowCache(32L * 1024 * 1024);
        var models = new SqliteModelStore(database);
        var now = DateTimeOffset.UtcNow;
        // The verb switched the site to Gaussian intervals last; both settings are timed here.
        var gaussian = site.Model with { IntervalMethod = IntervalMethod.Gaussian };
        var calibrated = site.Model with { IntervalMethod = IntervalMethod.Calibrated };
        var times = new List<double[]>();
        for (var i = 0; i < WarmupRefits + TimedRefits; i++)
        {
            var watch = Stopwatch.StartNew();
            var from = await loader.WindowStartAsync(site, site.Model.FitWindowDays, now, CancellationToken.None);
            var rows = (await loader.ReadAsync(site, from, now, CancellationToken.None))!;
            var read = watch.Elapsed.TotalMilliseconds;
            watch.Restart();
            var held = (await fitWindows.ReadAsync(site, from.ToUnixTimeMilliseconds(), now.ToUnixTimeMilliseconds(),
                (f, t, ct) => readings.ReadGridAsync(site.Id, f, t, ct), CancellationToken.None))!;
            var heldMs = watch.Elapsed.TotalMilliseconds;
            SiteGridLoader.Release(held);
            watch.Restart();
            var grid = SiteGridLoader.Build(site, rows, from, now);
            SiteGridLoader.Release(rows);
            var gridMs = watch.Elapsed.TotalMilliseconds;
            watch.Restart();
            SiteModelFitter.Fit(grid, gaussian);
            var gaussianMs = watch.Elapsed.TotalMilliseconds;
            watch.Restart();
            var model = SiteModelFitter.Fit(grid, calibrated);
            var rebuiltMs = watch.Elapsed.TotalMilliseconds;
            watch.Restart();
            SiteModelFitter.Fit(grid, calibrated, model, Calibration.DefaultCarryLimit);
            var carriedMs = watch.Elapsed.TotalMilliseconds;
            watch.Restart();
            var json = ModelJson.Write(model);
            var jsonMs = watch.Elapsed.TotalMilliseconds;
            watch.Restart();
            await models.SaveAsync(new StoredModel(site.Id, site.Key, now, rebuiltMs, site.SettingsVersion, model.Window.To, grid.ObservedCount,
                model.Diagnostics.LjungBox?.PValue, json));
            var storeMs = watch.Elapsed.TotalMilliseconds;
            if (i >= WarmupRefits)
            {
                times.Add([read, gridMs, gaussianMs, carriedMs, rebuiltMs, jsonMs, storeMs, heldMs]);
            }
        }

        double Stage(int k) => Median(times.Select(t => t[k]));
        return (Stage(0), Stage(1), Stage(2), Stage(3), Stage(4), Stage(5), Stage(6), Stage(7));
    }

    private static async Task<(double RequestMs, double FitMs, bool Carried)> RefitAsync(HttpClient client)
    {
        var watch = Stopwatch.StartNew();
        using var response = await client.PostAsync(new Uri($"/api/v1/sites/{SiteId}/model/refit", UriKind.Relative), null);
        var body = await response.Content.ReadAsByteArrayAsync();
        watch.Stop();
        response.EnsureSuccessStatusCode();
        using var answer = JsonDocument.Parse(body);
        var carried = answer.RootElement.GetProperty("notes").EnumerateArray().Any(n => n.GetString()!.StartsWith(CarriedNote, StringComparison.Ordinal));
        return (watch.Elapsed.TotalMilliseconds, answer.RootElement.GetProperty("fitDurationMs").GetDouble(), carried);
    }

    private static double Median(IEnumerable<double> values)
    {
        var sorted = values.Order().ToArray();
        return sorted.Length % 2 == 1 ? sorted[sorted.Length / 2] : (sorted[(sorted.Length / 2) - 1] + sorted[sorted.Length / 2]) / 2;
    }
}
