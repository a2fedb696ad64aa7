using System.Diagnostics;
using System.Globalization;
using System.Net.Http.Headers;
using System.Text;
using System.Text.Json;

namespace ForecastHub.Benchmarks;

/// <summary>
/// Ingest throughput against a running service (FORECASTHUB_URL, FORECASTHUB_KEY; started by
/// tests/benchmarks/ingest.sh): 100 sites x 10,000 hourly readings, one JSON request of 10,000 per
/// site, sent by two clients at once. Bodies are built before the clock starts, so the time is the
/// service's: parsing, validation, QC, the SQLite transaction and its fsync. Before the clock starts,
/// the same workload goes twice into warm-up sites of its own, so the runtime has compiled the ingest
/// path to optimised code (as the in-process verbs warm up): the figure is the service's steady state,
/// not its start-up. The measured sites are created before the warm-up, so their rows go into a file
/// that already holds the warm-up's 2,000,000.
/// With FORECASTHUB_PID set, the service's CPU time during the measured phase is printed as well.
/// </summary>
internal sealed class IngestVerb : IBenchmarkVerb
{
    private const int Sites = 100;
    internal const int PerSite = 10_000;
    private const int Clients = 2;
    private const int WarmupRounds = 2;

    public string Name => "ingest";

    public string Description => "1,000,000 readings in batches of 10,000 from two clients against a running service";

    public int Run(TextWriter output) => RunAsync(output).GetAwaiter().GetResult();

    private static async Task<int> RunAsync(TextWriter output)
    {
        var url = Environment.GetEnvironmentVariable("FORECASTHUB_URL");
        var key = Environment.GetEnvironmentVariable("FORECASTHUB_KEY");
        if (string.IsNullOrEmpty(url) || string.IsNullOrEmpty(key))
        {
            await output.WriteLineAsync("set FORECASTHUB_URL and FORECASTHUB_KEY (tests/benchmarks/ingest.sh does)").ConfigureAwait(false);
            return 2;
        }
        var clients = Enumerable.Range(0, Clients).Select(_ => NewClient(url, key)).ToArray();
        try
        {
            var bodies = Enumerable.Range(0, Sites).Select(Body).ToArray();
            await CreateSites(clients[0], SiteId).ConfigureAwait(false);
            await WarmUp(clients, bodies).ConfigureAwait(false);

            var cpuBefore = ServiceCpuSeconds();
            var clock = Stopwatch.StartNew();
            var accepted = await Task.WhenAll(Enumerable.Range(0, Clients).Select(c => Send(clients[c], bodies, c, SiteId))).ConfigureAwait(false);
            clock.Stop();
            var cpu = ServiceCpuSeconds() - cpuBefore;

            var total = accepted.Sum();
            var rate = total / clock.Elapsed.TotalSeconds;
            await output.WriteLineAsync(string.Create(CultureInfo.InvariantCulture,
                $"ingest: {total} readings accepted in {clock.Elapsed.TotalSeconds:0.000} s = {rate:0} readings/s")).ConfigureAwait(false);
            if (!double.IsNaN(cpu))
            {
                await output.WriteLineAsync(string.Create(CultureInfo.InvariantCulture,
                    $"service CPU (user+system) while measured: {cpu:0.0} s = {cpu * 1e6 / total:0.0} us per reading")).ConfigureAwait(false);
            }
            await output.WriteLineAsync(string.Create(CultureInfo.InvariantCulture, $"service_rate={rate:0}")).ConfigureAwait(false);
            return total == Sites * PerSite ? 0 : 1;
        }
        finally
        {
            foreach (var client in clients)
            {
                client.Dispose();
            }
        }
    }

    // The measured workload, untimed, into sites of its own, WarmupRounds times, each round followed
    // by a pause until the service's CPU time stops growing: the runtime compiles in tiers (quick
    // code, then instrumented code after 30 calls, then optimised code after 30 more, in a background
    // thread that waits while new code keeps appearing), and a method called once per request needs
    // both rounds to reach its optimised code. With one round of small batches, the compiler was busy
    // through the measured pass (a third of the service's CPU samples there).
    private static async Task WarmUp(HttpClient[] clients, byte[][] bodies)
    {
        for (var round = 0; round < WarmupRounds; round++)
        {
            var siteId = (int site) => WarmupSiteId(round, site);
            await CreateSites(clients[0], siteId).ConfigureAwait(false);
            await Task.WhenAll(Enumerable.Range(0, Clients).Select(c => Send(clients[c], bodies, c, siteId))).ConfigureAwait(false);
            await WaitUntilServiceIdle().ConfigureAwait(false);
        }
    }

    // Until the service used at most 20 ms of CPU in half a second (at least 2 s, at most 60 s); 2 s without FORECASTHUB_PID.
    private static async Task WaitUntilServiceIdle()
    {
        await Task.Delay(TimeSpan.FromSeconds(2)).ConfigureAwait(false);
        if (ServicePid() is { } pid)
        {
            await ServerProcess.WaitUntilIdleAsync(pid, TimeSpan.FromMilliseconds(500), 0.02, TimeSpan.FromSeconds(60)).ConfigureAwait(false);
        }
    }

    // CPU seconds of the service process, NaN without FORECASTHUB_PID.
    private static double ServiceCpuSeconds() => ServicePid() is { } pid ? ServerProcess.CpuSeconds(pid) : double.NaN;

    private static int? ServicePid() =>
        Environment.GetEnvironmentVariable("FORECASTHUB_PID") is { Length: > 0 } pid ? int.Parse(pid, CultureInfo.InvariantCulture) : null;

    private static async Task CreateSites(HttpClient client, Func<int, string> siteId)
    {
        for (var site = 0; site < Sites; site++)
        {
            using var created = await client.PostAsync(new Uri("api/v1/sites", UriKind.Relative), Json(new
            {
                id = siteId(site), name = $"Benchmark site {siteId(site)}", timeZone = "UTC", cadence = "hourly",
            })).ConfigureAwait(false);
            created.EnsureSuccessStatusCode();
        }
    }

    // Client c sends the bodies of sites c, c + Clients, c + 2 Clients, ... one after another.
    private static async Task<int> Send(HttpClient client, byte[][] bodies, int c, Func<int, string> siteId)
    {
        var accepted = 0;
        for (var site = c; site < bodies.Length; site += Clients)
        {
            using var content = new ByteArrayContent(bodies[site]);
            content.Headers.ContentType = new MediaTypeHeaderValue("application/json");
            using var response = await client.PostAsync(new Uri($"api/v1/sites/{siteId(site)}/observations", UriKind.Relative), content)
                .ConfigureAwait(false);
            var text = await response.Content.ReadAsStringAsync().ConfigureAwait(false);
            if (!response.IsSuccessStatusCode)
            {
                throw new InvalidOperationException($"site {site}: {response.StatusCode} {text}");
            }
            using var answer = JsonDocument.Parse(text);
            accepted += answer.RootElement.GetProperty("accepted").GetInt32();
        }
        return accepted;
    }

    // The site's 10,000 hourly readings from 2022-01-01.
    internal static byte[] Body(int site)
    {
        var start = new DateTimeOffset(2022, 1, 1, 0, 0, 0, TimeSpan.Zero);
        var random = new Random(site);
        var json = new StringBuilder("{\"unit\":\"C\",\"readings\":[");
        for (var i = 0; i < PerSite; i++)
        {
            var value = 10 + (8 * Math.Sin(2 * Math.PI * i / 24)) + random.NextDouble();
            json.Append(i == 0 ? "" : ",")
                .Append("{\"time\":\"").Append(start.AddHours(i).ToString("yyyy-MM-dd'T'HH:mm:ss'Z'", CultureInfo.InvariantCulture))
                .Append("\",\"value\":").Append(value.ToString("0.00", CultureInfo.InvariantCulture)).Append('}');
        }
        return Encoding.UTF8.GetBytes(json.Append("]}").ToString());
    }

    private static string SiteId(int site) => $"bench-{site:000}";

    private static string WarmupSiteId(int round, int site) => $"warm-up-{round}-{site:000}";

    private static HttpClient NewClient(string url, string key)
    {
        var client = new HttpClient { BaseAddress = new Uri(url.TrimEnd('/') + "/"), Timeout = TimeSpan.FromMinutes(5) };
        client.DefaultRequestHeaders.Authorization = new AuthenticationHeaderValue("Bearer", key);
        return client;
    }

    private static StringContent Json(object body) =>
        new(JsonSerializer.Serialize(body), Encoding.UTF8, "application/json");
}
