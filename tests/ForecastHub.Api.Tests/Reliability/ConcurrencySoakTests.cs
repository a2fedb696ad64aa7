using System.Collections.Concurrent;
using System.Diagnostics;
using System.Globalization;
using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;

namespace ForecastHub.Api.Tests.Reliability;

/// <summary>16 writers and 16 readers on one file for 30 s (FORECASTHUB_SOAK_SECONDS overrides):
/// no request fails, and every accepted reading can be read back.</summary>
[Trait("Category", "Soak")]
public sealed class ConcurrencySoakTests
{
    private const int Writers = 16;
    private const int Readers = 16;
    private const int Sites = 4;
    private const int BatchSize = 50;
    private static readonly DateTimeOffset Past = new(2025, 1, 1, 0, 0, 0, TimeSpan.Zero);

    [Fact]
    public async Task SixteenWritersAndSixteenReadersOnOneFileSeeNoErrorsAndLoseNothing()
    {
        var seconds = int.TryParse(Environment.GetEnvironmentVariable("FORECASTHUB_SOAK_SECONDS"), CultureInfo.InvariantCulture, out var s) ? s : 30;
        // 32 clients flat out exceed any per-key limit; the limiter has its own tests.
        await using var factory = new ApiFactory { Settings = new Dictionary<string, string?> { ["RateLimiting:Enabled"] = "false" } };
        using var setup = factory.CreateAdminClient();
        for (var site = 0; site < Sites; site++)
        {
            using var created = await setup.CreateSite(Some.Site($"soak-{site}"));
            Assert.Equal(HttpStatusCode.Created, created.StatusCode);
        }
        var errors = new ConcurrentQueue<string>();
        var accepted = new ConcurrentDictionary<(int Site, DateTimeOffset Time), double>();
        var reads = 0;
        var clock = Stopwatch.StartNew();
        var duration = TimeSpan.FromSeconds(seconds);

        var writers = Enumerable.Range(0, Writers).Select(w => Task.Run(async () =>
        {
            using var client = factory.CreateAdminClient();
            for (var batch = 0; clock.Elapsed < duration; batch++)
            {
                // Writers share sites; pairs of writers also resend each other's times (duplicates).
                var site = w % Sites;
                var slot = (w / Sites) % 2;
                var readings = Enumerable.Range(0, BatchSize)
                    .Select(i => (Time: Past.AddMinutes((((batch * 2) + slot) * BatchSize) + i), Value: 10.0 + (i % 7)))
                    .ToList();
                using var response = await client.PostReadings(readings, siteId: $"soak-{site}");
                if (response.StatusCode != HttpStatusCode.OK)
                {
                    errors.Enqueue($"writer {w}: {response.StatusCode} {await response.Content.ReadAsStringAsync()}");
                    continue;
                }
                var answer = await response.Json();
                if (answer.GetProperty("rejected").GetArrayLength() != 0)
                {
                    errors.Enqueue($"writer {w}: rejected {answer.GetProperty("rejected")}");
                }
                foreach (var r in readings)
                {
                    accepted[(site, r.Time)] = r.Value;
                }
            }
        })).ToArray();
        var readers = Enumerable.Range(0, Readers).Select(r => Task.Run(async () =>
        {
            using var client = factory.CreateAdminClient();
            while (clock.Elapsed < duration)
            {
                var path = r % 4 == 0 ? "/api/v1/sites" : $"/api/v1/sites/soak-{r % Sites}/observations?limit=500";
                using var response = await client.GetAsync(new Uri(path, UriKind.Relative));
                if (response.StatusCode != HttpStatusCode.OK)
                {
                    errors.Enqueue($"reader {r}: {response.StatusCode} {await response.Content.ReadAsStringAsync()}");
                }
                Interlocked.Increment(ref reads);
            }
        })).ToArray();
        await Task.WhenAll(writers.Concat(readers));

        Assert.Empty(errors);
        Assert.True(reads > Readers, $"only {reads} reads");
        for (var site = 0; site < Sites; site++)
        {
            var stored = (await setup.AllReadings($"soak-{site}")).ToDictionary(
                x => DateTimeOffset.Parse(x.GetProperty("time").GetString()!, CultureInfo.InvariantCulture),
                x => x.GetProperty("value").GetDouble());
            var expected = accepted.Where(a => a.Key.Site == site).ToList();
            Assert.NotEmpty(expected);
            Assert.Equal(expected.Count, stored.Count);
            Assert.All(expected, a => Assert.Equal(a.Value, stored[a.Key.Time]));
        }
    }
}
