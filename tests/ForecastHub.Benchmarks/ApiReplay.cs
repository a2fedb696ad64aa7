using System.Globalization;
using System.Net.Http.Headers;
using System.Net.Http.Json;
using System.Text.Json;
using ForecastHub.Api.Models;
using ForecastHub.Core.Grid;
using ForecastHub.Storage.Sites;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Mvc.Testing;
using Microsoft.Data.Sqlite;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Time.Testing;

namespace ForecastHub.Benchmarks;

/// <summary>
/// Plays a year of daily readings through the service's HTTP API as a logger and a dashboard would:
/// each morning (00:30 local) the dashboard asks the day's forecast, each night (00:05 local of the
/// next day) the logger posts the day's reading. The service runs in a test host (the real pipeline,
/// its own SQLite file, default settings but the rate limit) whose clock is a fake that this replay
/// moves; the background refit service runs as shipped. Before each forecast request the replay waits
/// until any refit the service's own policy calls for has run, as a day's wait would.
/// </summary>
internal static class ApiReplay
{
    private const string AdminKey = "seattle-replay-admin-key-0123456789abcdef";

    // Two forecast requests per morning: the dashboard's 80/95 % view, and five more levels so that the
    // step's predictive distribution is known at 14 quantiles (P(below 0 C) and CRPS are read from it).
    private const string DashboardLevels = "80,95";
    private const string ExtraLevels = "10,30,50,70,90";

    public sealed record SeriesInput(string SiteId, string Statistic, DateOnly[] Dates, double[] Values);

    public sealed record Result(Dictionary<string, DayAheadForecasts> Forecasts, Dictionary<string, int> Refits, Dictionary<string, string> Orders);

    public static async Task<Result> RunAsync(IReadOnlyList<SeriesInput> series, DateOnly firstTarget, DateOnly lastTarget, TextWriter output)
    {
        var zone = GridBuilder.FindZone("America/Los_Angeles");
        DateTimeOffset LocalTime(DateOnly day, int hour, int minute) => GridBuilder.LocalDayStart(day, zone).AddHours(hour).AddMinutes(minute);

        var clock = new FakeTimeProvider(LocalTime(firstTarget, 0, 5));
        var folder = Directory.CreateTempSubdirectory("forecasthub-replay-");
        try
        {
            await using var host = new ReplayHost(clock, Path.Combine(folder.FullName, "replay.db"));
            using var client = host.CreateClient();
            client.DefaultRequestHeaders.Authorization = new AuthenticationHeaderValue("Bearer", AdminKey);
            var sites = host.Services.GetRequiredService<ISiteStore>();
            var models = host.Services.GetRequiredService<ModelService>();

            async Task CatchUpAsync(string siteId)
            {
                var site = await sites.GetAsync(siteId) ?? throw new InvalidOperationException($"site {siteId} vanished");
                await models.RefitIfDueAsync(site, force: false, CancellationToken.None);
            }

            // The history before the first target day, posted in one batch.
            foreach (var s in series)
            {
                var created = await client.PostAsJsonAsync("/api/v1/sites", new { id = s.SiteId, name = $"Seattle {s.Statistic}", timeZone = "America/Los_Angeles", cadence = "daily", dailyStatistic = s.Statistic });
                created.EnsureSuccessStatusCode();
                var history = Enumerable.Range(0, s.Dates.Length).Where(i => s.Dates[i] < firstTarget).ToArray();
                await PostAsync(client, s.SiteId, history.Select(i => (LocalTime(s.Dates[i], 12, 0), s.Values[i])));
                await CatchUpAsync(s.SiteId);
            }

            var days = lastTarget.DayNumber - firstTarget.DayNumber + 1;
            var collected = series.ToDictionary(s => s.SiteId, _ => new Collected(days));
            for (var day = firstTarget; day <= lastTarget; day = day.AddDays(1))
            {
                var k = day.DayNumber - firstTarget.DayNumber;
                clock.Advance(LocalTime(day, 0, 30) - clock.GetUtcNow());
                foreach (var s in series)
                {
                    await CatchUpAsync(s.SiteId);
                    var view = await ForecastAsync(client, s.SiteId, DashboardLevels, day, zone);
                    var extra = await ForecastAsync(client, s.SiteId, ExtraLevels, day, zone);
                    collected[s.SiteId].Add(k, view, extra);
                }

                clock.Advance(LocalTime(day.AddDays(1), 0, 5) - clock.GetUtcNow());
                foreach (var s in series)
                {
                    var i = Array.IndexOf(s.Dates, day);
                    if (i >= 0)
                    {
                        await PostAsync(client, s.SiteId, [(LocalTime(day, 12, 0), s.Values[i])]);
                    }
                }

                if (k % 73 == 72)
                {
                    output.WriteLine($"  replayed to {day:yyyy-MM-dd}");
                }
            }

            return new Result(
                collected.ToDictionary(c => c.Key, c => c.Value.Forecasts("ForecastHub (API)")),
                collected.ToDictionary(c => c.Key, c => c.Value.FittedAt.Count),
                collected.ToDictionary(c => c.Key, c => string.Join(", ", c.Value.Orders.GroupBy(o => o).OrderByDescending(g => g.Count()).Select(g => $"{g.Key} x{g.Count()}"))));
        }
        finally
        {
            SqliteConnection.ClearAllPools();
            folder.Delete(recursive: true);
        }
    }

    private static async Task PostAsync(HttpClient client, string siteId, IEnumerable<(DateTimeOffset Time, double Value)> readings)
    {
        var body = new { unit = "C", readings = readings.Select(r => new { time = r.Time.ToString("O", CultureInfo.InvariantCulture), value = r.Value }).ToArray() };
        var answer = await client.PostAsJsonAsync($"/api/v1/sites/{siteId}/observations", body);
        answer.EnsureSuccessStatusCode();
    }

    private static async Task<JsonElement> ForecastAsync(HttpClient client, string siteId, string levels, DateOnly day, TimeZoneInfo zone)
    {
        var answer = await client.GetFromJsonAsync<JsonElement>($"/api/v1/sites/{siteId}/forecast?steps=1&levels={levels}");
        var step = answer.GetProperty("steps")[0];
        var target = GridBuilder.LocalDate(step.GetProperty("time").GetDateTimeOffset(), zone);
        if (target != day)
        {
            throw new InvalidOperationException($"{siteId}: the forecast's first step is {target}, expected {day}.");
        }

        return answer;
    }

    /// <summary>The forecasts gathered for one site, by day.</summary>
    private sealed class Collected(int days)
    {
        private readonly double[] mean = new double[days];
        private readonly double[] lower80 = new double[days];
        private readonly double[] upper80 = new double[days];
        private readonly double[] lower95 = new double[days];
        private readonly double[] upper95 = new double[days];
        private readonly PredictiveQuantiles[] distribution = new PredictiveQuantiles[days];

        public HashSet<DateTimeOffset> FittedAt { get; } = [];

        public List<string> Orders { get; } = [];

        public void Add(int k, JsonElement view, JsonElement extra)
        {
            var model = view.GetProperty("model");
            FittedAt.Add(model.GetProperty("fittedAt").GetDateTimeOffset());
            Orders.Add($"AR({model.GetProperty("order").GetInt32()})");
            var step = view.GetProperty("steps")[0];
            mean[k] = step.GetProperty("mean").GetDouble();
            var intervals = Intervals(step);
            (lower80[k], upper80[k]) = intervals[0.80];
            (lower95[k], upper95[k]) = intervals[0.95];
            var all = intervals.Concat(Intervals(extra.GetProperty("steps")[0]))
                .SelectMany(i => new[] { ((1 - i.Key) / 2, i.Value.Lower), ((1 + i.Key) / 2, i.Value.Upper) });
            distribution[k] = new PredictiveQuantiles(all);
        }

        public DayAheadForecasts Forecasts(string method) => new(method, mean, lower80, upper80, lower95, upper95, distribution);

        private static Dictionary<double, (double Lower, double Upper)> Intervals(JsonElement step) =>
            step.GetProperty("intervals").EnumerateArray().ToDictionary(
                i => Math.Round(i.GetProperty("level").GetDouble() is var l && l > 1 ? l / 100 : l, 4),
                i => (i.GetProperty("lower").GetDouble(), i.GetProperty("upper").GetDouble()));
    }

    /// <summary>The real pipeline in a test host (any type of the API assembly names it; its Program clashes with ours): its own SQLite file, a known admin key, the replay's clock.
    /// The per-key rate limit is off (about 2,200 requests run in a few minutes of wall time).</summary>
    private sealed class ReplayHost(FakeTimeProvider clock, string databasePath) : WebApplicationFactory<RefitOptions>
    {
        protected override void ConfigureWebHost(IWebHostBuilder builder)
        {
            builder.UseContentRoot(Path.Combine(ServerProcess.RepoRoot(), "src", "ForecastHub.Api"));
            builder.UseSetting("Storage:Path", databasePath);
            builder.UseSetting("Auth:AdminKey", AdminKey);
            builder.UseSetting("RateLimiting:Enabled", "false");
            builder.UseSetting("Serilog:MinimumLevel:Default", "Error");
            builder.ConfigureServices(services => services.AddSingleton<TimeProvider>(clock));
        }
    }
}
