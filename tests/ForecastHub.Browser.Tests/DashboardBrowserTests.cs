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
    public async Task OnAPhoneTheNightRiskIsOnTheFirstScreenBeforeAnyDiagnostics()
    {
        await using var server = await DemoServer.StartAsync();
        await server.WaitForModelsAsync(["ambrel-low"]);
        await using var browser = await HeadlessBrowser.OpenAsync(390, 844);
        var page = browser.Page;

        await page.GotoAsync(new Uri(server.BaseAddress, "#site=ambrel-low").ToString());
        await page.Locator("#risk-panel .risk-row").First.WaitForAsync();

        var chance = await page.Locator("#risk-panel .risk-chance").First.BoundingBoxAsync();
        var strip = await page.Locator("#risk-panel svg.risk-strip").First.BoundingBoxAsync();
        var facts = await page.Locator("#risk-panel .risk-facts").First.BoundingBoxAsync();
        var diagnostics = await page.Locator("#diagnostics-heading").BoundingBoxAsync();
        var forecastChart = await page.Locator("#forecast-panel").BoundingBoxAsync();
        Assert.True(chance!.Y + chance.Height <= 844, $"chance ends at {chance.Y + chance.Height}");
        Assert.True(strip!.Y + strip.Height <= 844, $"hour strip ends at {strip.Y + strip.Height}");
        Assert.True(facts!.Y + facts.Height <= 844, $"first crossing and hours end at {facts.Y + facts.Height}");
        Assert.True(diagnostics!.Y > strip.Y && forecastChart!.Y > strip.Y);
        Assert.True(strip.X + strip.Width <= 390);
        Assert.Matches(@"\d+(\.\d)? %", await page.Locator("#risk-panel .risk-chance").First.InnerTextAsync());
        Assert.True(int.Parse(await page.Locator("#risk-panel svg.risk-strip").First.GetAttributeAsync("data-hours") ?? "0", CultureInfo.InvariantCulture) >= 1);
        Assert.Equal("frost", await page.Locator("#risk-panel .risk-row").First.GetAttributeAsync("data-threshold"));
        Assert.Contains("front", await page.Locator("#caution-banner").InnerTextAsync(), StringComparison.OrdinalIgnoreCase);
        await browser.ScreenshotAsync("dashboard-phone-night-risk.png");
        Assert.Empty(browser.Problems);
    }

    [Fact]
    public async Task ThresholdsEditedOnThePageAreKeptByTheServiceAndSurviveAReload()
    {
        await using var server = await DemoServer.StartAsync();
        await server.WaitForModelsAsync(["ambrel-low"]);
        await using var browser = await HeadlessBrowser.OpenAsync(390, 844);
        var page = browser.Page;
        await page.GotoAsync(new Uri(server.BaseAddress, "#site=ambrel-low").ToString());
        await page.Locator("#threshold-editor .threshold-row").First.WaitForAsync();

        // Without a key the page says which key is needed and nothing changes.
        await page.Locator("#threshold-editor .t-value").First.FillAsync("1.5");
        await page.Locator("#threshold-save").ClickAsync();
        await page.Locator("#threshold-status:has-text('admin key')").WaitForAsync();

        // The key is kept for the tab; a reload draws the page once with it, so no redraw races the edits below.
        await page.Locator("#api-key").FillAsync(DemoServer.AdminKey);
        await page.Locator("#key-form button").ClickAsync();
        await page.ReloadAsync();
        await page.Locator("#threshold-editor .threshold-row").First.WaitForAsync();
        await page.Locator("#threshold-editor .t-value").First.FillAsync("1.5");
        await page.Locator("#threshold-editor .t-add").ClickAsync();
        var added = page.Locator("#threshold-editor .threshold-row").Last;
        await added.Locator(".t-id").FillAsync("mild");
        await added.Locator(".t-direction").SelectOptionAsync("above");
        await added.Locator(".t-value").FillAsync("4");
        await page.Locator("#threshold-save").ClickAsync();
        await page.Locator("#risk-panel .risk-row[data-threshold='mild']").WaitForAsync();

        await page.ReloadAsync();
        await page.Locator("#risk-panel .risk-row[data-threshold='mild']").WaitForAsync();

        Assert.Equal("1.5", await page.Locator("#threshold-editor .t-value").First.InputValueAsync());
        Assert.Equal(3, await page.Locator("#threshold-editor .threshold-row").CountAsync());
        Assert.Contains("above 4.0 °C", await page.Locator("#risk-panel .risk-row[data-threshold='mild']").InnerTextAsync(), StringComparison.Ordinal);
        Assert.DoesNotContain(browser.Problems, p => !p.Contains("401", StringComparison.Ordinal));
    }
}
