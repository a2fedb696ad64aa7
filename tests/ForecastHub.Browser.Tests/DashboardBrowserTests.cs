using System.Globalization;
using Microsoft.Playwright;

namespace ForecastHub.Browser.Tests;

public sealed class DashboardBrowserTests
{
    // The demo loggers with enough history for a model (the tunnel logger is new).
    private static readonly string[] FittedSites = ["ambrel-low", "ambrel-mid", "ambrel-top", "ambrel-store"];

    private static async Task<int> DataPoints(ILocator locator) =>
        int.Parse(await locator.GetAttributeAsync("data-points") ?? "0", CultureInfo.InvariantCulture);

    [Fact]
    public async Task DashboardDrawsForecastAndModelChartsWithoutConsoleErrors()
    {
        await using var server = await DemoServer.StartAsync();
        await server.WaitForModelsAsync(FittedSites);
        await using var browser = await HeadlessBrowser.OpenAsync();
        var page = browser.Page;

        await page.GotoAsync(new Uri(server.BaseAddress, "#site=ambrel-low").ToString());
        await page.Locator("#nextday-panel").WaitForAsync();
        // The backtest behind the verification panel takes seconds on first call.
        await page.Locator("#verification-scores").WaitForAsync(new() { Timeout = 120_000 });

        Assert.Equal(5, await page.Locator(".site-card").CountAsync());
        var states = await page.Locator(".site-card .state").EvaluateAllAsync<string[]>("els => els.map(e => e.dataset.state)");
        Assert.True(states.Distinct().Count() >= 2, "site list shows " + string.Join(", ", states));
        var forecast = page.Locator("#forecast-panel svg");
        Assert.True(await DataPoints(forecast.Locator("path.history")) >= 48);
        Assert.Equal(48, await DataPoints(forecast.Locator("path.forecast-mean")));
        Assert.Equal(48, await DataPoints(forecast.Locator("path.band-80")));
        Assert.Equal(48, await DataPoints(forecast.Locator("path.band-95")));
        Assert.True(await page.Locator("section.panel:has-text('Autocorrelation (ACF)') rect.bar").CountAsync() >= 10);
        Assert.True(await page.Locator("section.panel:has-text('Partial autocorrelation') rect.bar").CountAsync() >= 5);
        Assert.True(await DataPoints(page.Locator("section.panel:has-text('AIC by order') path.criterion.aic")) >= 2);
        Assert.Matches(@"\d+(\.\d)? %", await page.Locator("#nextday-panel .probability .value").First.InnerTextAsync());
        Assert.True(await page.Locator("#coefficients tbody tr").CountAsync() >= 1);
        Assert.Equal(3, await page.Locator("#verification-panel path.series").CountAsync());
        Assert.Contains("front", await page.Locator("#cautions").InnerTextAsync(), StringComparison.OrdinalIgnoreCase);
        await browser.ScreenshotAsync("dashboard-fitted-site.png");

        Assert.Empty(browser.Problems);
    }

    [Fact]
    public async Task SiteWithoutAModelShowsItsHistoryAndSaysWhy()
    {
        await using var server = await DemoServer.StartAsync();
        await using var browser = await HeadlessBrowser.OpenAsync();
        var page = browser.Page;

        await page.GotoAsync(new Uri(server.BaseAddress, "#site=ambrel-tunnel").ToString());
        await page.Locator("#forecast-panel").WaitForAsync();

        Assert.True(await DataPoints(page.Locator("#forecast-panel path.history")) >= 48);
        Assert.Equal(0, await page.Locator("#forecast-panel path.forecast-mean").CountAsync());
        Assert.Contains("No model yet", await page.Locator("#detail").InnerTextAsync(), StringComparison.Ordinal);
        Assert.Equal("warming-up", await page.Locator(".site-head .state").GetAttributeAsync("data-state"));
        await browser.ScreenshotAsync("dashboard-site-without-model.png");

        Assert.Empty(browser.Problems);
    }

    [Fact]
    public async Task ChangingTheThresholdAsksForTheProbabilityBelowTheNewValue()
    {
        await using var server = await DemoServer.StartAsync();
        await server.WaitForModelsAsync(["ambrel-low"]);
        await using var browser = await HeadlessBrowser.OpenAsync();
        var page = browser.Page;
        await page.GotoAsync(new Uri(server.BaseAddress, "#site=ambrel-low").ToString());
        await page.Locator("#nextday-panel").WaitForAsync();

        await page.Locator("#below").FillAsync("25");
        var request = page.WaitForRequestAsync(r => r.Url.Contains("/forecast?", StringComparison.Ordinal));
        await page.Locator("#threshold-form button").ClickAsync();
        var sent = await request;
        await page.Locator("#nextday-panel .probability .text:has-text('25.0 °C')").WaitForAsync();

        Assert.Contains("below=25", sent.Url, StringComparison.Ordinal);
        Assert.Empty(browser.Problems);
    }
}
