using Microsoft.Playwright;

namespace ForecastHub.Browser.Tests;

/// <summary>Debian's Chromium driven by Playwright (never a downloaded browser), with every console
/// error, page error and failed request collected.</summary>
internal sealed class HeadlessBrowser : IAsyncDisposable
{
    private const string ChromiumPath = "/usr/bin/chromium";

    private static readonly string[] LaunchArgs =
    [
        "--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
        "--disable-component-update", "--disable-sync", "--no-first-run",
    ];

    private readonly IPlaywright playwright;
    private readonly IBrowser browser;
    private readonly List<string> problems = [];

    private HeadlessBrowser(IPlaywright playwright, IBrowser browser, IPage page)
    {
        this.playwright = playwright;
        this.browser = browser;
        Page = page;
        page.Console += (_, message) =>
        {
            if (message.Type is "error" or "warning")
            {
                Record($"console {message.Type}: {message.Text}");
            }
        };
        page.PageError += (_, error) => Record($"page error: {error}");
        page.Response += (_, response) =>
        {
            if (response.Status >= 400)
            {
                Record($"HTTP {response.Status} for {response.Url}");
            }
        };
        page.RequestFailed += (_, request) => Record($"request failed: {request.Url} {request.Failure}");
    }

    public IPage Page { get; }

    /// <summary>Console errors and warnings, uncaught exceptions and failed requests seen so far.</summary>
    public IReadOnlyList<string> Problems
    {
        get
        {
            lock (problems)
            {
                return [.. problems];
            }
        }
    }

    public static async Task<HeadlessBrowser> OpenAsync(int width = 1440, int height = 1000)
    {
        var playwright = await Playwright.CreateAsync();
        var browser = await playwright.Chromium.LaunchAsync(new BrowserTypeLaunchOptions
        {
            ExecutablePath = ChromiumPath,
            Headless = true,
            Args = LaunchArgs,
        });
        var page = await browser.NewPageAsync(new BrowserNewPageOptions
        {
            ViewportSize = new ViewportSize { Width = width, Height = height },
            TimezoneId = "UTC",
            Locale = "en-GB",
        });
        return new HeadlessBrowser(playwright, browser, page);
    }

    public async Task ScreenshotAsync(string name) =>
        await Page.ScreenshotAsync(new PageScreenshotOptions { Path = Path.Combine(RepoPaths.Artifacts, name), FullPage = true });

    private void Record(string problem)
    {
        lock (problems)
        {
            problems.Add(problem);
        }
    }

    public async ValueTask DisposeAsync()
    {
        await browser.DisposeAsync();
        playwright.Dispose();
    }
}
