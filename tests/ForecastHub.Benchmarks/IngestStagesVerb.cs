using System.Diagnostics;
using System.Globalization;
using ForecastHub.Api.Observations;
using ForecastHub.Api.Problems;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Quality;
using ForecastHub.Storage.Migrations;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage;
using Microsoft.AspNetCore.Http;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Benchmarks;

/// <summary>
/// Where the CPU of one ingest request goes: the steps of the observations endpoint and the
/// reading store, called one by one on the same 10,000-reading JSON body the ingest benchmark
/// posts, each request into a fresh site of a temporary WAL file (synchronous=FULL), as in the
/// benchmark. Prints the median and 10th percentile of each step in ms per request and ns per reading,
/// and the kilobytes each step allocated.
/// </summary>
internal sealed class IngestStagesVerb : IBenchmarkVerb
{
    private const int Warmup = 5;
    private const int Repeats = 40;

    public string Name => "ingest-stages";

    public string Description => "time per step of one 10,000-reading JSON ingest request (read, parse, validate, plan, insert, commit)";

    public int Run(TextWriter output) => RunAsync(output).GetAwaiter().GetResult();

    private static async Task<int> RunAsync(TextWriter output)
    {
        var folder = Directory.CreateTempSubdirectory("forecasthub-stages");
        try
        {
            var database = new SqliteDatabase(new StorageOptions { Path = Path.Combine(folder.FullName, "stages.db") });
            await new MigrationRunner(database).ApplyAsync().ConfigureAwait(false);
            var sites = new SqliteSiteStore(database, TimeProvider.System);
            var body = IngestVerb.Body(0);
            var now = DateTimeOffset.UtcNow;
            var timings = new Dictionary<string, List<double>>();
            for (var r = 0; r < Warmup + Repeats; r++)
            {
                var siteId = string.Create(CultureInfo.InvariantCulture, $"stages-{r:000}");
                await sites.CreateAsync(new SiteRecord(siteId, siteId, "UTC", GridCadence.Hourly, null, null, null, null, QualityLimits.Default,
                    ModelSettings.DefaultFor(GridCadence.Hourly) with { FitWindowDays = 365 }, now, now)).ConfigureAwait(false);
                var steps = await OneRequest(database, siteId, body, now).ConfigureAwait(false);
                if (r >= Warmup)
                {
                    foreach (var (step, ms) in steps)
                    {
                        (timings.TryGetValue(step, out var list) ? list : timings[step] = []).Add(ms);
                    }
                }
            }
            SqliteConnection.ClearAllPools();
            await output.WriteLineAsync(string.Create(CultureInfo.InvariantCulture,
                $"{IngestVerb.PerSite} readings, {body.Length} bytes per request, {Repeats} requests")).ConfigureAwait(false);
            await output.WriteLineAsync($"{"step",-34} {"median ms",10} {"p10 ms",8} {"ns/reading",11} {"KB allocated",13}").ConfigureAwait(false);
            foreach (var (step, list) in timings)
            {
                list.Sort();
                var median = list[list.Count / 2];
                await output.WriteLineAsync(string.Create(CultureInfo.InvariantCulture,
                    $"{step,-34} {median,10:0.000} {list[list.Count / 10],8:0.000} {median * 1e6 / IngestVerb.PerSite,11:0} {Allocated[step] / 1024.0,13:0}")).ConfigureAwait(false);
            }
            return 0;
        }
        finally
        {
            SqliteConnection.ClearAllPools();
            folder.Delete(recursive: true);
        }
    }

    // Bytes each step allocated in the last request.
    private static readonly Dictionary<string, long> Allocated = [];

    // The endpoint's and the store's steps in their order; times in milliseconds.
    private static async Task<List<(string Step, double Ms)>> OneRequest(SqliteDatabase database, string siteId, byte[] body, DateTimeOffset now)
    {
        var steps = new List<(string, double)>();
        var clock = Stopwatch.StartNew();
        var allocated = GC.GetAllocatedBytesForCurrentThread();
        void Step(string name)
        {
            steps.Add((name, clock.Elapsed.TotalMilliseconds));
            var allocatedNow = GC.GetAllocatedBytesForCurrentThread();
            Allocated[name] = allocatedNow - allocated;
            allocated = allocatedNow;
            clock.Restart();
        }

        var context = new DefaultHttpContext();
        context.Request.Body = new MemoryStream(body);
        context.Request.ContentLength = body.Length;
        clock.Restart();
        allocated = GC.GetAllocatedBytesForCurrentThread();
        var read = await RequestBody.ReadAsync(context.Request, ObservationsEndpoints.MaxBodyBytes, CancellationToken.None).ConfigureAwait(false);
        Step("body read");
        var valid = Utf8JsonReadings.TryRead(read!, null, now, ObservationsEndpoints.MaxReadings)!.Valid;
        Step("JSON read + row rules (fast path)");
        _ = ObservationsEndpoints.ReadJsonStrict(read!, null, now);
        Step("(strict path instead: JsonDocument)");

        using var connection = database.Open();
        using var transaction = connection.BeginTransaction(deferred: false);
        Step("[lock] open + BEGIN IMMEDIATE");
        var (siteKey, limits) = SqliteReadingStore.FindSite(connection, transaction, siteId)!.Value;
        Step("[lock] site look-up");
        var stored = SqliteReadingStore.LoadNeighbourhood(connection, transaction, siteKey, valid, limits.FlatlineHours);
        Step("[lock] neighbourhood load");
        var plan = IngestPlanner.Plan(stored, valid, ConflictPolicy.Reject, limits);
        Step("[lock] IngestPlanner.Plan");
        SqliteReadingStore.Insert(connection, siteKey, plan.Inserts, now.ToUnixTimeMilliseconds());
        Step("[lock] insert");
        transaction.Commit();
        Step("[lock] commit (fsync)");
        return steps;
    }
}
