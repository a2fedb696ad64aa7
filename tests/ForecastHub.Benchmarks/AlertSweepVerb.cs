using System.Diagnostics;
using System.Globalization;
using ForecastHub.Api.Alerts;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Cluster;
using ForecastHub.Api.Forecasts;
using ForecastHub.Api.Health;
using ForecastHub.Api.Hosting;
using ForecastHub.Api.Metrics;
using ForecastHub.Api.Models;
using ForecastHub.Api.Sites;
using ForecastHub.Api.Verification;
using ForecastHub.Api.Webhooks;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Risk;
using ForecastHub.Storage.Migrations;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using Microsoft.Data.Sqlite;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Logging;

namespace ForecastHub.Benchmarks;

/// <summary>
/// The alert sweep over a fleet of fitted hourly sites: the service's own components (storage,
/// models, health, alert evaluation) composed as in the server, without HTTP; CPU time of the
/// whole process per sweep of sites with two alerting thresholds each, target at most 2 s for 1,000 sites.
/// </summary>
internal sealed class AlertSweepVerb : IBenchmarkVerb
{
    private const double TargetCpuSeconds = 2.0;
    private const int MeasuredSweeps = 5;
    private const int SettlingColdSweeps = 3;

    public string Name => "alerts";

    public string Description => "alert sweep over 1,000 fitted hourly sites with 2 thresholds each: CPU time per sweep (target <= 2 s)";

    public int Run(TextWriter output) => RunAsync(output).GetAwaiter().GetResult();

    private static async Task<int> RunAsync(TextWriter output)
    {
        var sites = BenchmarkOptions.FromEnvironment().Sites;
        const int days = 21;
        var path = Path.Combine(Path.GetTempPath(), $"forecasthub-alerts-{Guid.NewGuid():N}.db");
        try
        {
            var end = DateTimeOffset.UtcNow;
            var seeding = Stopwatch.StartNew();
            await FleetSeeder.SeedAsync(path, sites, days, end);
            output.WriteLine($"seeded {sites} hourly sites x {days} days in {seeding.Elapsed.TotalSeconds:0.0} s");

            await using var provider = Compose(path);
            await provider.GetRequiredService<MigrationRunner>().ApplyAsync();
            var store = provider.GetRequiredService<ISiteStore>();
            var models = provider.GetRequiredService<ModelService>();
            var fitting = Stopwatch.StartNew();
            foreach (var site in await store.ListAsync(null, sites))
            {
                await models.RefitIfDueAsync(site, force: true, CancellationToken.None);
            }
            output.WriteLine($"fitted {sites} sites in {fitting.Elapsed.TotalSeconds:0.0} s");

            // Two alerting thresholds per site, as the target says: a frost level and a warm level.
            foreach (var site in await store.ListAsync(null, sites))
            {
                await store.UpdateAsync(site.Id, s => s with
                {
                    Risk = s.Risk with { Thresholds = [new SiteThreshold("frost", ThresholdDirection.Below, 0, 0.3), new SiteThreshold("warm", ThresholdDirection.Above, 25, 0.5)] },
                });
            }

            var worker = provider.GetRequiredService<AlertWorker>();

            // The first sweep computes every site's forecast with its risk (2,000 sample paths per site) and records each health state;
            // that is what a sweep costs after new data has reached every site. Later sweeps find the forecasts cached.
            var cold = await SweepAsync(worker);
            output.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"cold sweep (every forecast and risk computed, {sites} health states recorded): {cold.Cpu:0.000} s CPU, {cold.Wall:0.000} s wall"));
            var measured = new List<(double Cpu, double Wall)>();
            for (var i = 0; i < MeasuredSweeps; i++)
            {
                measured.Add(await SweepAsync(worker));
            }

            var cpu = measured.Select(m => m.Cpu).Order().ToList();
            var wall = measured.Select(m => m.Wall).Order().ToList();
            output.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"warm sweep (forecasts cached), {MeasuredSweeps} runs: CPU median {cpu[MeasuredSweeps / 2]:0.000} s (min {cpu[0]:0.000}, max {cpu[^1]:0.000}), wall median {wall[MeasuredSweeps / 2]:0.000} s"));
            // A new reading at every site before each sweep (not timed): what a running server pays each sweep, the raised
            // alerts' changed figures stored. A server has swept many times: the first untimed ones let the runtime finish
            // compiling the optimised code of the cold path (tier-up), which the process's first sweep only starts.
            var coldRuns = new List<(double Cpu, double Wall)>();
            for (var i = 0; i < SettlingColdSweeps + MeasuredSweeps; i++)
            {
                await NewReadingAtEverySiteAsync(provider, sites);
                var run = await SweepAsync(worker);
                if (i >= SettlingColdSweeps)
                {
                    coldRuns.Add(run);
                }
            }

            var coldCpu = coldRuns.Select(m => m.Cpu).Order().ToList();
            var steady = (Cpu: coldCpu[MeasuredSweeps / 2], Wall: coldRuns.Select(m => m.Wall).Order().ElementAt(MeasuredSweeps / 2));
            output.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"cold sweep again (a new reading at every site, code compiled; {MeasuredSweeps} runs after {SettlingColdSweeps} untimed): CPU median {steady.Cpu:0.000} s (min {coldCpu[0]:0.000}, max {coldCpu[^1]:0.000}), wall median {steady.Wall:0.000} s"));
            await StagesAsync(provider, output);

            // The target is judged on the sweep a running server repeats: new readings at every site, code compiled. The
            // process's first sweep also compiles every path it runs, once per process; its figure is printed above.
            var met = steady.Cpu <= TargetCpuSeconds;
            output.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"target <= {TargetCpuSeconds} s CPU per sweep of {sites} sites with 2 thresholds each (new readings everywhere, code compiled): {(met ? "met" : "NOT met")}; the first sweep, with start-up compilation: {cold.Cpu:0.000} s"));
            output.WriteLine($"load average: {File.ReadAllText("/proc/loadavg").Trim()}");
            return met ? 0 : 1;
        }
        finally
        {
            SqliteConnection.ClearAllPools();
            foreach (var file in new[] { path, path + "-wal", path + "-shm" })
            {
                File.Delete(file);
            }
        }
    }

    /// <summary>One reading now at every site, 0.3 °C above its newest, through the service's reading store (as an ingest would).</summary>
    private static async Task NewReadingAtEverySiteAsync(ServiceProvider provider, int sites)
    {
        var store = provider.GetRequiredService<ISiteStore>();
        var readings = provider.GetRequiredService<IReadingStore>();
        var now = DateTimeOffset.UtcNow;
        foreach (var site in await store.ListAsync(null, sites))
        {
            var recent = await readings.ReadGridAsync(site.Id, now.AddHours(-3).ToUnixTimeMilliseconds(), now.ToUnixTimeMilliseconds());
            var value = recent![^1].ValueC + 0.3;
            await readings.IngestAsync(site.Id, [new IncomingReading(0, now.ToUnixTimeMilliseconds(), value, value, "C")], ConflictPolicy.Reject, now);
        }
    }

    private static async Task<(double Cpu, double Wall)> SweepAsync(AlertWorker worker)
    {
        var process = Process.GetCurrentProcess();
        process.Refresh();
        var cpuBefore = process.TotalProcessorTime;
        var wall = Stopwatch.StartNew();
        await worker.SweepAsync(CancellationToken.None);
        wall.Stop();
        process.Refresh();
        return ((process.TotalProcessorTime - cpuBefore).TotalSeconds, wall.Elapsed.TotalSeconds);
    }

    /// <summary>Where a cold sweep's time goes: each step of a site's evaluation timed over every site, in process CPU per site.</summary>
    private static async Task StagesAsync(ServiceProvider provider, TextWriter output)
    {
        var store = provider.GetRequiredService<ISiteStore>();
        var forecasts = provider.GetRequiredService<ForecastService>();
        var models = provider.GetRequiredService<ModelService>();
        var health = provider.GetRequiredService<ModelHealthService>();
        var sites = await store.ListAsync(null, BenchmarkOptions.FromEnvironment().Sites);
        var (query, _, _) = ForecastQuery.Parse(false, null, null, null, null);
        var now = DateTimeOffset.UtcNow;
        var served = new List<(SiteRecord Site, ServingModel Model, ForecastHub.Core.Grid.TimeGrid Grid)>();
        var grids = await CpuPerSiteAsync(sites.Count, async () =>
        {
            foreach (var site in sites)
            {
                if (await forecasts.RecentGridAsync(site, now, CancellationToken.None) is { } grid && await models.GetAsync(site, CancellationToken.None) is { } model)
                {
                    served.Add((site, model, grid));
                }
            }
        });
        var core = await CpuPerSiteAsync(served.Count, () =>
        {
            foreach (var (site, model, grid) in served)
            {
                ForecastMapping.Forecast(model.Model, grid, query!.Steps, query.Levels, query.Below, query.Above, seed: 1, site.Risk, SiteGridLoader.AlignDown(site, now));
            }

            return Task.CompletedTask;
        });
        var assessments = await CpuPerSiteAsync(sites.Count, async () =>
        {
            foreach (var site in sites)
            {
                await health.EvaluateAsync(site, CancellationToken.None);
            }
        });
        output.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"stages, CPU per site: recent grid read and model {grids * 1000:0.000} ms; forecast with next-day summary and risk (core and mapping) {core * 1000:0.000} ms; health assessment {assessments * 1000:0.000} ms (once per evaluation: the forecast reuses the alert's)"));
    }

    private static async Task<double> CpuPerSiteAsync(int count, Func<Task> action)
    {
        var process = Process.GetCurrentProcess();
        process.Refresh();
        var before = process.TotalProcessorTime;
        await action();
        process.Refresh();
        return (process.TotalProcessorTime - before).TotalSeconds / Math.Max(1, count);
    }

    /// <summary>The server's storage, model, webhook and alert registrations on one SQLite file; hosted services are not started.</summary>
    private static ServiceProvider Compose(string path)
    {
        var configuration = new ConfigurationBuilder()
            .AddInMemoryCollection(new Dictionary<string, string?> { ["Storage:Path"] = path })
            .Build();
        var services = new ServiceCollection();
        services.AddSingleton<IConfiguration>(configuration);
        services.AddLogging(logging => logging.SetMinimumLevel(LogLevel.Warning));
        services.AddMetrics();
        services.AddForecastHubStorage();
        services.AddForecastHubAuth();
        services.AddForecastHubMetrics();
        services.AddCluster();
        services.AddSites();
        services.AddModels();
        services.AddForecasts();
        services.AddVerification();
        services.AddModelHealth();
        services.AddWebhooks();
        services.AddAlerts();
        return services.BuildServiceProvider();
    }
}
