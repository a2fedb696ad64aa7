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
/// small batches to two warm-up sites let the runtime compile the ingest path to optimised code (as
/// the in-process verbs warm up), so the figure is the service's steady state, not its start-up.
/// With FORECASTHUB_PID set, the service's CPU time during the measured phase is printed as well.
/// </summary>
internal sealed class IngestVerb : IBenchmarkVerb
{
    private const int Sites = 100;
    internal const int PerSite = 10_000;
    private const int Clients = 2;
    private const int WarmupSites = 2;
    private const int WarmupRequests = 60;
    private const int WarmupPerRequest = 200;

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
            for (var site = 0; site < Sites; site++)
            {
                using var created = await clients[0].PostAsync(new Uri("api/v1/sites", UriKind.Relative), Json(new
                {
                    id = SiteId(site), name = $"Benchmark site {site}", timeZone = "UTC", cadence = "hourly",
                })).ConfigureAwait(false);
                created.EnsureSuccessStatusCode();
            }
            var bodies = Enumerable.Range(0, Sites).Select(Body).ToArray();
            await WarmUp(clients).ConfigureAwait(false);

            var cpuBefore = ServiceCpuSeconds();
            var clock = Stopwatch.StartNew();
            var accepted = await Task.WhenAll(Enumerable.Range(0, Clients).Select(c => Send(clients[c], bodies, c))).ConfigureAwait(false);
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

    // Each client posts small consecutive batches to its own warm-up site, then the runtime gets a
    // moment to finish compiling the hot methods in the background.
    private static async Task WarmUp(HttpClient[] clients)
    {
        for (var w = 0; w < WarmupSites; w++)
        {
            using var created = await clients[0].PostAsync(new Uri("api/v1/sites", UriKind.Relative), Json(new
            {
                id = WarmupSiteId(w), name = $"Warm-up site {w}", timeZone = "UTC", cadence = "hourly",
            })).ConfigureAwait(false);
            created.EnsureSuccessStatusCode();
        }
        await Task.WhenAll(Enumerable.Range(0, WarmupSites).Select(async w =>
        {
            for (var r = 0; r < WarmupRequests; r++)
            {
                using var content = new ByteArrayContent(Body(w, r * WarmupPerRequest, WarmupPerRequest));
                content.Headers.ContentType = new MediaTypeHeaderValue("application/json");
                using var response = await clients[w % Clients].PostAsync(
                    new Uri($"api/v1/sites/{WarmupSiteId(w)}/observations", UriKind.Relative), content).ConfigureAwait(false);
                response.EnsureSuccessStatusCode();
            }
        })).ConfigureAwait(false);
        await Task.Delay(TimeSpan.FromSeconds(2)).ConfigureAwait(false);
    }

    // utime + stime of the service process (fields 14 and 15 of /proc/PID/stat), NaN without FORECASTHUB_PID.
    private static double ServiceCpuSeconds()
    {
        var pid = Environment.GetEnvironmentVariable("FORECASTHUB_PID");
        if (string.IsNullOrEmpty(pid))
        {
            return double.NaN;
        }
        var stat = File.ReadAllText($"/proc/{pid}/stat");
        var fields = stat[(stat.LastIndexOf(')') + 2)..].Split(' ');
        var ticks = long.Parse(fields[11], CultureInfo.InvariantCulture) + long.Parse(fields[12], CultureInfo.InvariantCulture);
        return ticks / 100.0; // USER_HZ, 100 on Linux
    }

    // Client c sends the bodies of sites c, c + Clients, c + 2 Clients, ... one after another.
    private static async Task<int> Send(HttpClient client, byte[][] bodies, int c)
    {
        var accepted = 0;
        for (var site = c; site < bodies.Length; site += Clients)
        {
            using var content = new ByteArrayContent(bodies[site]);
            content.Headers.ContentType = new MediaTypeHeaderValue("application/json");
            using var response = await client.PostAsync(new Uri($"api/v1/sites/{SiteId(site)}/observations", UriKind.Relative), content)
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

    internal static byte[] Body(int site) => Body(site, 0, PerSite);

    // Readings first .. first + count - 1 of the site's hourly series from 2022-01-01.
    private static byte[] Body(int site, int first, int count)
    {
        var start = new DateTimeOffset(2022, 1, 1, 0, 0, 0, TimeSpan.Zero);
        var random = new Random(site + first);
        var json = new StringBuilder("{\"unit\":\"C\",\"readings\":[");
        for (var i = first; i < first + count; i++)
        {
            var value = 10 + (8 * Math.Sin(2 * Math.PI * i / 24)) + random.NextDouble();
            json.Append(i == first ? "" : ",")
                .Append("{\"time\":\"").Append(start.AddHours(i).ToString("yyyy-MM-dd'T'HH:mm:ss'Z'", CultureInfo.InvariantCulture))
                .Append("\",\"value\":").Append(value.ToString("0.00", CultureInfo.InvariantCulture)).Append('}');
        }
        return Encoding.UTF8.GetBytes(json.Append("]}").ToString());
    }

    private static string SiteId(int site) => $"bench-{site:000}";

    private static string WarmupSiteId(int site) => $"warm-up-{site}";

    private static HttpClient NewClient(string url, string key)
    {
        var client = new HttpClient { BaseAddress = new Uri(url.TrimEnd('/') + "/"), Timeout = TimeSpan.FromMinutes(5) };
        client.DefaultRequestHeaders.Authorization = new AuthenticationHeaderValue("Bearer", key);
        return client;
    }

    private static StringContent Json(object body) =>
        new(JsonSerializer.Serialize(body), Encoding.UTF8, "application/json");
}
