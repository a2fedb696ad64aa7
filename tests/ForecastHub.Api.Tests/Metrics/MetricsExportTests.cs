using System.Globalization;
using System.Net;
using System.Net.Http.Headers;
using System.Net.Http.Json;
using System.Text.RegularExpressions;
using ForecastHub.Api.Forecasts;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;
using Microsoft.AspNetCore.Http;
using ForecastHub.Storage.Sites;
using Microsoft.AspNetCore.TestHost;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Metrics;

public sealed class MetricsExportTests
{
    [Fact]
    public async Task ScrapeCarriesHttpServerRuntimeAndPerSiteSeries()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("north");
        var lastReading = factory.Clock.GetUtcNow().AddHours(-3);
        await factory.IngestAsync("north", Enumerable.Range(0, 48).Select(h => (lastReading.AddHours(-h), 4.0 + (h % 5 * 0.3))));
        await client.GetAsync(new Uri("/api/v1/sites", UriKind.Relative));

        var text = await ScrapeAsync(client);

        Assert.Matches(@"(?m)^http_server_request_duration_seconds_count\{[^}]*http_route=""/api/v1/sites/""[^}]*\} 1$", text);
        Assert.Contains("# TYPE http_server_request_duration_seconds histogram\n", text, StringComparison.Ordinal);
        Assert.Contains("# TYPE dotnet_process_cpu_count gauge\n", text, StringComparison.Ordinal);
        Assert.Contains("forecasthub_site_health{site=\"north\",state=\"warming-up\"} 1\n", text, StringComparison.Ordinal);
        Assert.Equal(3 * 3600.0, Sample(text, "forecasthub_site_reading_age_seconds{site=\"north\"}"));
        Assert.Equal(0, Sample(text, "forecasthub_site_series_omitted"));
        Assert.Contains("forecasthub_readings_total{outcome=\"accepted\"} 48\n", text, StringComparison.Ordinal);
        Assert.Contains("service_name=\"forecasthub\"", text, StringComparison.Ordinal);
    }

    [Fact]
    public async Task DocumentedScrapeExampleHasTheFamiliesAndLabelsOfARealScrape()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("north");
        await factory.IngestAsync("north", Enumerable.Range(0, 48).Select(h => (factory.Clock.GetUtcNow().AddHours(-h - 1), 4.0)));

        var scrape = (await ScrapeAsync(client)).Split('\n');
        var example = ForecastHub.Api.OpenApi.MetricsDocumentFilter.Example.TrimEnd('\n').Split('\n');

        // Each family of the OpenAPI example is declared as the exporter declares it, and each example series has the label names of a real one.
        Assert.All(example.Where(l => l.StartsWith("# TYPE ", StringComparison.Ordinal)), line => Assert.Contains(line, scrape));
        foreach (var series in example.Where(l => !l.StartsWith('#')))
        {
            var name = series[..series.IndexOf('{', StringComparison.Ordinal)];
            Assert.Contains(scrape, l => l.StartsWith(name + "{", StringComparison.Ordinal) && LabelNames(l).SequenceEqual(LabelNames(series)));
        }
    }

    [Fact]
    public async Task NightRiskPerThresholdIsTheLatestEvaluatedRiskAndAScrapeNeverComputesOne()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        using (var created = await client.PostAsJsonAsync(new Uri("/api/v1/sites", UriKind.Relative), new
        {
            id = "frosty", name = "Frosty", timeZone = "Europe/Berlin", cadence = "hourly",
            thresholds = new object[] { new { id = "frost", direction = "below", valueC = 0.5 }, new { id = "heat", direction = "above", valueC = 30.0 } },
        }))
        {
            Assert.Equal(HttpStatusCode.Created, created.StatusCode);
        }
        await factory.IngestAsync("frosty", ModelScenario.History(factory, days: 8));
        await client.RefitAsync("frosty");

        var beforeEvaluation = await ScrapeAsync(client);
        var sites = factory.Services.GetRequiredService<ISiteStore>();
        var (risk, _) = await factory.Services.GetRequiredService<SiteRiskService>().EvaluateAsync((await sites.GetAsync("frosty"))!, null, CancellationToken.None);
        var afterEvaluation = await ScrapeAsync(client);

        Assert.DoesNotMatch(@"(?m)^forecasthub_site_risk_night_probability\{", beforeEvaluation);
        var night = risk!.Risk.Where(r => r.Window.Name == "night").ToList();
        Assert.Equal(2, night.Count);
        foreach (var r in night)
        {
            Assert.Equal(r.Probability, Sample(afterEvaluation, $"forecasthub_site_risk_night_probability{{direction=\"{r.Direction}\",site=\"frosty\",threshold=\"{r.Id}\"}}"), 12);
        }
    }

    [Fact]
    public async Task PerSiteSeriesStopAtTheCapAndTheRestAreCounted()
    {
        await using var factory = new ApiFactory { Settings = new Dictionary<string, string?> { ["Metrics:MaxSiteSeries"] = "2" } };
        using var client = factory.CreateAdminClient();
        foreach (var id in new[] { "c-site", "a-site", "b-site" })
        {
            await client.CreateHourlySiteAsync(id);
        }

        var text = await ScrapeAsync(client);

        Assert.Contains("forecasthub_site_health{site=\"a-site\",", text, StringComparison.Ordinal);
        Assert.Contains("forecasthub_site_health{site=\"b-site\",", text, StringComparison.Ordinal);
        Assert.DoesNotContain("site=\"c-site\"", text, StringComparison.Ordinal);
        Assert.Equal(1, Sample(text, "forecasthub_site_series_omitted"));
        Assert.Equal(3, Sample(text, "forecasthub_sites{state=\"warming-up\"}"));
    }

    [Fact]
    public async Task PrivatePortServesMetricsWithoutAKeyAndOnlyThere()
    {
        const int privatePort = 9464;
        await using var factory = new ApiFactory { Settings = new Dictionary<string, string?> { ["Metrics:AnonymousPort"] = "9464" } };
        _ = factory.CreateClient();

        var onPrivatePort = await SendAsync(factory.Server, "/metrics", privatePort, host: "localhost:8080");
        var onPublicPort = await SendAsync(factory.Server, "/metrics", 8080, host: "localhost:9464");
        var otherRouteOnPrivatePort = await SendAsync(factory.Server, "/api/v1/sites", privatePort, host: "localhost:9464");

        Assert.Equal(StatusCodes.Status200OK, onPrivatePort.Response.StatusCode);
        Assert.Equal(StatusCodes.Status401Unauthorized, onPublicPort.Response.StatusCode);
        Assert.Equal(StatusCodes.Status401Unauthorized, otherRouteOnPrivatePort.Response.StatusCode);
    }

    [Fact]
    public async Task WithoutThePrivatePortSettingMetricsNeedAKey()
    {
        await using var factory = new ApiFactory();
        _ = factory.CreateClient();

        var context = await SendAsync(factory.Server, "/metrics", 9464, host: "localhost:9464");

        Assert.Equal(StatusCodes.Status401Unauthorized, context.Response.StatusCode);
    }

    [Theory]
    [InlineData("Metrics:AnonymousPort", "70000")]
    [InlineData("Metrics:MaxSiteSeries", "-1")]
    public void OutOfRangeMetricsSettingsStopTheStart(string key, string value)
    {
        using var factory = new ApiFactory { Settings = new Dictionary<string, string?> { [key] = value } };

        var error = Assert.ThrowsAny<Exception>(() => factory.CreateClient());

        Assert.Contains(key, error.ToString(), StringComparison.Ordinal);
    }

    private static async Task<string> ScrapeAsync(HttpClient client)
    {
        using var response = await client.GetAsync(new Uri("/metrics", UriKind.Relative));
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal(new MediaTypeHeaderValue("text/plain") { CharSet = "utf-8", Parameters = { new NameValueHeaderValue("version", "0.0.4") } }.MediaType,
            response.Content.Headers.ContentType?.MediaType);
        return await response.Content.ReadAsStringAsync();
    }

    private static Task<HttpContext> SendAsync(TestServer server, string path, int localPort, string host) =>
        server.SendAsync(context =>
        {
            context.Request.Method = HttpMethods.Get;
            context.Request.Path = path;
            context.Request.Host = new HostString(host);
            context.Connection.LocalPort = localPort;
        });

    private static string[] LabelNames(string series) =>
        [.. Regex.Matches(series[..series.IndexOf('}', StringComparison.Ordinal)], @"(\w+)=""").Select(m => m.Groups[1].Value)];

    private static double Sample(string text, string series)
    {
        var match = Regex.Match(text, "^" + Regex.Escape(series) + @"(?:\{\})? (\S+)$", RegexOptions.Multiline);
        Assert.True(match.Success, $"no sample for {series}");
        return double.Parse(match.Groups[1].Value, CultureInfo.InvariantCulture);
    }
}
