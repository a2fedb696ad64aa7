using System.Diagnostics;
using System.Globalization;
using System.Net;
using System.Text.RegularExpressions;
using ForecastHub.Core.Quality;
using ForecastHub.Storage.Postgres;
using ForecastHub.Storage.Postgres.Migrations;
using ForecastHub.Storage.Postgres.Readings;
using ForecastHub.Storage.Postgres.Sites;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.TestData;
using Npgsql;

namespace ForecastHub.Benchmarks;

/// <summary>Fleet refit with two API nodes on one PostgreSQL database: every site fitted exactly once across both.</summary>
internal sealed class PostgresFleetVerb : IBenchmarkVerb
{
    public string Name => "fleet-postgres";

    public string Description => "1,000 sites x 1 year hourly refit by two nodes on one PostgreSQL (each site fitted once; wall time)";

    public int Run(TextWriter output) => PostgresBenchmarks.FleetAsync(BenchmarkOptions.FromEnvironment(), output).GetAwaiter().GetResult();
}

/// <summary>wrk against the forecast endpoint and liveness on one PostgreSQL node.</summary>
internal sealed class PostgresThroughputVerb : IBenchmarkVerb
{
    public string Name => "throughput-postgres";

    public string Description => "wrk: 48-step two-level forecast vs /health/live on a PostgreSQL node (>= 0.5 x liveness, p99 <= 20 ms)";

    public int Run(TextWriter output) => PostgresBenchmarks.ThroughputAsync(BenchmarkOptions.FromEnvironment(), output).GetAwaiter().GetResult();
}

/// <summary>
/// The service benchmarks on the PostgreSQL backend. Each starts a private PostgreSQL server with
/// stock durability (fsync on), seeds it through the PostgreSQL stores, and runs the API as child
/// processes on it.
/// </summary>
internal static partial class PostgresBenchmarks
{
    public static async Task<int> FleetAsync(BenchmarkOptions options, TextWriter output)
    {
        ArgumentNullException.ThrowIfNull(options);
        var dll = ServerProcess.BuildApi();
        var server = PostgresServer.StartDurable();
        var db = await server.CreateDatabaseAsync();
        var seedWatch = Stopwatch.StartNew();
        await SeedAsync(db, options.Sites, options.Days);
        output.WriteLine(Invariant($"seeded {options.Sites} sites x {options.Days * 24} hourly readings in {seedWatch.Elapsed.TotalSeconds:F1} s"));

        // A copy of the seeded database for the one-node run, made before any node touches either.
        var single = await server.CreateDatabaseAsync(template: db);

        var (twoNodes, fits) = await RefitAsync(dll, db, options.Sites, ["node-a", "node-b"]);
        output.WriteLine(Invariant($"fleet refit on two nodes: {options.Sites} sites with a model {twoNodes:F1} s after start; fits node-a {fits[0]}, node-b {fits[1]}, total {fits.Sum()}"));
        var (oneNode, _) = await RefitAsync(dll, single, options.Sites, ["node-solo"]);
        output.WriteLine(Invariant($"fleet refit on one node (same data, same run): {oneNode:F1} s; two nodes took {twoNodes / oneNode:P0} of that"));
        output.WriteLine(Invariant($"load average: {File.ReadAllText("/proc/loadavg")[..14]}"));
        var once = fits.Sum() == options.Sites;
        output.WriteLine(once ? "each site fitted exactly once across the two nodes: met" : "each site fitted exactly once across the two nodes: MISSED");
        return once ? 0 : 1;
    }

    // Starts the nodes on the seeded database and waits until every site has a model and no fit is running; answers the wall time and each node's fits.
    private static async Task<(double Seconds, double[] Fits)> RefitAsync(string dll, string db, int sites, string[] names)
    {
        var watch = Stopwatch.StartNew();
        var nodes = names.Select(n => ServerProcess.Start(dll, "unused.db", Args(db, n))).ToArray();
        try
        {
            foreach (var node in nodes)
            {
                await node.WaitReadyAsync(watch, TimeSpan.FromSeconds(60));
            }

            long models = 0;
            while (models < sites)
            {
                await Task.Delay(250);
                models = await ScalarAsync(db, "SELECT count(*) FROM site_models;");
                if (watch.Elapsed > TimeSpan.FromMinutes(20))
                {
                    throw new TimeoutException($"only {models} of {sites} sites fitted after 20 minutes");
                }
            }

            var seconds = watch.Elapsed.TotalSeconds;
            // The nodes finish what they hold before the fits are counted.
            while (await ScalarAsync(db, "SELECT count(*) FROM work_leases WHERE kind = 'refit';") > 0)
            {
                await Task.Delay(100);
            }

            return (seconds, await Task.WhenAll(nodes.Select(FitsAsync)));
        }
        finally
        {
            foreach (var node in nodes)
            {
                await node.DisposeAsync();
            }
        }
    }

    public static async Task<int> ThroughputAsync(BenchmarkOptions options, TextWriter output)
    {
        ArgumentNullException.ThrowIfNull(options);
        var dll = ServerProcess.BuildApi();
        var db = await PostgresServer.StartDurable().CreateDatabaseAsync();
        await SeedAsync(db, sites: 1, days: 60);
        await using var node = ServerProcess.Start(dll, "unused.db", [.. Args(db, "node-a"), "--RateLimiting:Enabled=false"]);
        await node.WaitReadyAsync(Stopwatch.StartNew(), TimeSpan.FromSeconds(60));
        using (var refit = await node.Client.PostAsync(new Uri("/api/v1/sites/site-0000/model/refit", UriKind.Relative), null))
        {
            if (refit.StatusCode != HttpStatusCode.OK)
            {
                throw new InvalidOperationException($"refit answered {(int)refit.StatusCode}: {await refit.Content.ReadAsStringAsync()}");
            }
        }

        var forecastPath = "/api/v1/sites/site-0000/forecast?steps=48&levels=80,95";
        using (var warm = await node.Client.GetAsync(new Uri(forecastPath, UriKind.Relative)))
        {
            warm.EnsureSuccessStatusCode();
        }

        var live = Wrk(new Uri(node.BaseAddress, "/health/live"), options.Seconds);
        // Transactions the database counted while the cached forecast was timed: a served-from-cache answer needs none.
        var transactionsBefore = await TransactionsAsync(db);
        var forecast = Wrk(new Uri(node.BaseAddress, forecastPath), options.Seconds);
        var transactions = await TransactionsAsync(db) - transactionsBefore;
        output.WriteLine(Invariant($"PostgreSQL node /health/live: {live.RequestsPerSecond:F0} req/s, p99 {live.P99Ms:F2} ms"));
        output.WriteLine(Invariant($"PostgreSQL node forecast 48 steps, levels 80,95: {forecast.RequestsPerSecond:F0} req/s, p99 {forecast.P99Ms:F2} ms; database transactions meanwhile {transactions}"));
        output.WriteLine(Invariant($"load average: {File.ReadAllText("/proc/loadavg")[..14]}"));
        var ratio = forecast.RequestsPerSecond / live.RequestsPerSecond;
        output.WriteLine(Invariant($"ratio forecast/live {ratio:F2} (target >= 0.5: {(ratio >= 0.5 ? "met" : "MISSED")}); forecast p99 <= 20 ms: {(forecast.P99Ms <= 20 ? "met" : "MISSED")}"));
        return ratio >= 0.5 && forecast.P99Ms <= 20 ? 0 : 1;
    }

    private static string[] Args(string connectionString, string node) =>
        ["--Storage:Provider=postgres", $"--Storage:ConnectionString={connectionString}", $"--Cluster:NodeName={node}"];

    // Sites and their hourly series through the PostgreSQL stores (one ingest per site).
    private static async Task SeedAsync(string connectionString, int sites, int days)
    {
        await using var database = new PostgresDatabase(connectionString);
        await new PostgresMigrationRunner(database).ApplyAsync();
        var siteStore = new PostgresSiteStore(database, TimeProvider.System);
        var readings = new PostgresReadingStore(database);
        var now = DateTimeOffset.UtcNow;
        var end = new DateTimeOffset(now.Year, now.Month, now.Day, now.Hour, 0, 0, TimeSpan.Zero);
        var start = end.AddHours(-days * 24);
        for (var s = 0; s < sites; s++)
        {
            var id = string.Create(CultureInfo.InvariantCulture, $"site-{s:0000}");
            await siteStore.CreateAsync(new SiteRecord(id, $"Benchmark site {s}", "Europe/Berlin", ForecastHub.Core.Grid.GridCadence.Hourly, null, null, null, null,
                QualityLimits.Default, new ForecastHub.Core.Modeling.ModelSettings { FitWindowDays = 365 }, start, start));
            var series = SyntheticSeries.Hourly(start, days * 24, seed: s)
                .Select((r, i) => new IncomingReading(i, r.Time.ToUnixTimeMilliseconds(), r.ValueC, r.ValueC, "C")).ToArray();
            await readings.IngestAsync(id, series, ConflictPolicy.Reject, start);
        }
    }

    private static async Task<long> ScalarAsync(string connectionString, string sql)
    {
        await using var connection = new NpgsqlConnection(connectionString);
        await connection.OpenAsync();
        await using var command = new NpgsqlCommand(sql, connection);
        return (long)(await command.ExecuteScalarAsync())!;
    }

    // Commits and rollbacks of the benchmark's database so far (the statistics collector lags by up to a second).
    private static async Task<long> TransactionsAsync(string connectionString)
    {
        await Task.Delay(TimeSpan.FromSeconds(1.5));
        return await ScalarAsync(connectionString, "SELECT xact_commit + xact_rollback FROM pg_stat_database WHERE datname = current_database();");
    }

    private static async Task<double> FitsAsync(ServerProcess server)
    {
        var text = await server.Client.GetStringAsync(new Uri("/metrics", UriKind.Relative));
        var match = FitsOk().Match(text);
        return match.Success ? double.Parse(match.Groups[1].Value, CultureInfo.InvariantCulture) : 0;
    }

    private static (double RequestsPerSecond, double P99Ms) Wrk(Uri url, int seconds)
    {
        var output = ServerProcess.Run("wrk",
            $"-t2 -c16 -d{seconds}s --latency -H \"Authorization: Bearer {ServerProcess.AdminKey}\" {url}", Environment.CurrentDirectory);
        if (output.Contains("Non-2xx", StringComparison.Ordinal))
        {
            throw new InvalidOperationException("wrk saw non-2xx answers:\n" + output);
        }

        var rps = double.Parse(RequestsPerSecond().Match(output).Groups[1].Value, CultureInfo.InvariantCulture);
        var p99 = P99().Match(output);
        var value = double.Parse(p99.Groups[1].Value, CultureInfo.InvariantCulture);
        return (rps, p99.Groups[2].Value switch { "us" => value / 1000, "s" => value * 1000, _ => value });
    }

    [GeneratedRegex("""^forecasthub_fits_total\{outcome="ok"\} (\S+)$""", RegexOptions.Multiline)]
    private static partial Regex FitsOk();

    [GeneratedRegex(@"Requests/sec:\s+([\d.]+)")]
    private static partial Regex RequestsPerSecond();

    [GeneratedRegex(@"99%\s+([\d.]+)(us|ms|s)")]
    private static partial Regex P99();

    private static string Invariant(FormattableString text) => text.ToString(CultureInfo.InvariantCulture);
}
