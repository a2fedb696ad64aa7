using System.Globalization;
using System.Net;
using System.Xml.Linq;
using ForecastHub.Api.Forecasts;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;

namespace ForecastHub.Api.Tests.Forecasts;

/// <summary>The SVG chart: renderer alone, and GET .../forecast.svg through the real pipeline.</summary>
public sealed class ForecastChartTests
{
    private static readonly XNamespace Svg = "http://www.w3.org/2000/svg";
    private static readonly DateTimeOffset Origin = new(2025, 6, 1, 12, 0, 0, TimeSpan.FromHours(2));

    private static List<ChartPoint> History(int hours) =>
        [.. Enumerable.Range(0, hours).Select(i => new ChartPoint(Origin.AddHours(i - hours), 10 + Math.Sin(i / 4.0)))];

    private static List<ChartStep> Steps(int count) =>
        [.. Enumerable.Range(1, count).Select(h => new ChartStep(Origin.AddHours(h), 12,
            new Dictionary<int, (double, double)> { [80] = (12 - (0.5 * h), 12 + (0.5 * h)), [95] = (12 - (0.8 * h), 12 + (0.8 * h)) }))];

    private static XElement Render(IReadOnlyList<ChartPoint> history, IReadOnlyList<ChartStep> steps) =>
        XDocument.Parse(ForecastChart.Render("Orchard <north> & co", "°C", history, steps)).Root!;

    private static XElement ByClass(XElement root, string name, string cssClass) =>
        root.Descendants(Svg + name).Single(e => (string?)e.Attribute("class") == cssClass);

    [Fact]
    public void ChartIsWellFormedSvgWithAnEscapedTitleAndAxisLabelsWithUnits()
    {
        var root = Render(History(48), Steps(24));

        Assert.Equal(Svg + "svg", root.Name);
        Assert.Equal("Orchard <north> & co", root.Element(Svg + "title")!.Value);
        Assert.Equal("Temperature (°C)", ByClass(root, "text", "y-label").Value);
        Assert.Equal("Local time (UTC+02:00)", ByClass(root, "text", "x-label").Value);
    }

    [Fact]
    public void BandsHistoryAndForecastAreDrawnWithOnePointPerStep()
    {
        var root = Render(History(48), Steps(24));

        Assert.Equal(48, ByClass(root, "polygon", "band-95").Attribute("points")!.Value.Split(' ').Length);
        Assert.Equal(48, ByClass(root, "polygon", "band-80").Attribute("points")!.Value.Split(' ').Length);
        Assert.Equal(48, ByClass(root, "polyline", "history").Attribute("points")!.Value.Split(' ').Length);
        Assert.Equal(24, ByClass(root, "polyline", "forecast").Attribute("points")!.Value.Split(' ').Length);
    }

    [Fact]
    public void WiderBandReachesFurtherFromTheMeanThanTheNarrowerOne()
    {
        var root = Render([], Steps(6));
        static double Top(XElement polygon) => polygon.Attribute("points")!.Value.Split(' ')
            .Select(p => double.Parse(p.Split(',')[1], CultureInfo.InvariantCulture)).Min();

        // SVG y grows downwards: the 95% band's top edge is higher up (smaller y).
        Assert.True(Top(ByClass(root, "polygon", "band-95")) < Top(ByClass(root, "polygon", "band-80")));
    }

    [Fact]
    public void ChartWithNothingToDrawSaysSo()
    {
        var root = Render([], []);

        Assert.Contains(root.Descendants(Svg + "text"), t => t.Value == "No data to draw yet.");
        Assert.Empty(root.Descendants(Svg + "polygon"));
    }

    [Fact]
    public async Task ChartEndpointDrawsTheForecastWithBandsAndUnits()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("orchard-1");
        await factory.IngestAsync("orchard-1", ModelScenario.History(factory, days: 10));
        await client.RefitAsync("orchard-1");

        using var response = await client.GetAsync(new Uri("/api/v1/sites/orchard-1/forecast.svg?steps=24", UriKind.Relative));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("image/svg+xml", response.Content.Headers.ContentType?.MediaType);
        var root = XDocument.Parse(await response.Content.ReadAsStringAsync()).Root!;
        Assert.Equal("Temperature (°C)", ByClass(root, "text", "y-label").Value);
        Assert.StartsWith("Local time (UTC+02:00)", ByClass(root, "text", "x-label").Value, StringComparison.Ordinal);
        Assert.Equal(48, ByClass(root, "polygon", "band-80").Attribute("points")!.Value.Split(' ').Length);
        Assert.Equal(48, ByClass(root, "polygon", "band-95").Attribute("points")!.Value.Split(' ').Length);
        Assert.Equal(48, ByClass(root, "polyline", "history").Attribute("points")!.Value.Split(' ').Length);
        Assert.Contains("official warnings come first", root.Element(Svg + "title")!.Value, StringComparison.Ordinal);
    }

    [Fact]
    public async Task ChartOfAnUnknownSiteIs404AndOfASiteWithoutModelIs409()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("young");

        await ProblemAssert.IsProblem(await client.GetAsync(new Uri("/api/v1/sites/nowhere/forecast.svg", UriKind.Relative)), HttpStatusCode.NotFound);
        var conflict = await ProblemAssert.IsProblem(await client.GetAsync(new Uri("/api/v1/sites/young/forecast.svg", UriKind.Relative)), HttpStatusCode.Conflict);
        Assert.Contains("no fitted model", conflict.GetProperty("detail").GetString(), StringComparison.Ordinal);
        await ProblemAssert.NamesField(await client.GetAsync(new Uri("/api/v1/sites/young/forecast.svg?steps=0", UriKind.Relative)), HttpStatusCode.BadRequest, "steps");
    }
}
