using System.Globalization;
using System.Net;
using System.Net.Http.Headers;
using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;

namespace ForecastHub.Api.Tests.Forecasts;

public sealed class ForecastUnitsAndExportTests
{
    [Theory]
    [InlineData("/api/v1/sites/units/forecast?step=3", "step")]
    [InlineData("/api/v1/sites/units/forecast?steps=3&threshold=0", "threshold")]
    [InlineData("/api/v1/sites/units/forecast.svg?below=0", "below")]
    [InlineData("/api/v1/sites/units/forecast?unit=R", "unit")]
    [InlineData("/api/v1/sites/units/forecast?format=xml", "format")]
    [InlineData("/api/v1/sites/units/forecast.svg?unit=celsius", "unit")]
    public async Task UnknownParametersAndValuesAreRefusedByName(string path, string field)
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("units");

        using var response = await client.GetAsync(new Uri(path, UriKind.Relative));

        await ProblemAssert.NamesField(response, HttpStatusCode.BadRequest, field);
    }

    [Fact]
    public async Task ParameterNamesInAnotherCaseAreReadNotRefused()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("units");

        // Binding reads names without case, so the unknown-parameter check does too: only the value is judged.
        using var response = await client.GetAsync(new Uri("/api/v1/sites/units/forecast?Steps=0", UriKind.Relative));

        await ProblemAssert.NamesField(response, HttpStatusCode.BadRequest, "steps");
    }

    [Fact]
    public async Task FahrenheitAndKelvinAnswersAreTheCelsiusAnswerConverted()
    {
        await using var factory = await FittedAsync();
        using var client = factory.CreateAdminClient();

        var celsius = await client.GetJsonAsync("/api/v1/sites/units/forecast?steps=6&below=0&above=20");
        var fahrenheit = await client.GetJsonAsync("/api/v1/sites/units/forecast?steps=6&below=32&above=68&unit=F");
        var kelvin = await client.GetJsonAsync("/api/v1/sites/units/forecast?steps=6&below=273.15&above=293.15&unit=K");

        Assert.Equal("C", celsius.GetProperty("unit").GetString());
        Assert.Equal("F", fahrenheit.GetProperty("unit").GetString());
        Assert.Equal("K", kelvin.GetProperty("unit").GetString());
        var c = celsius.GetProperty("steps").EnumerateArray().ToList();
        var f = fahrenheit.GetProperty("steps").EnumerateArray().ToList();
        var k = kelvin.GetProperty("steps").EnumerateArray().ToList();
        for (var i = 0; i < c.Count; i++)
        {
            // Exact conversions (F = C * 9/5 + 32, K = C + 273.15); 1e-9 allows for rounding of the doubles.
            Assert.Equal((Number(c[i], "mean") * 9 / 5) + 32, Number(f[i], "mean"), 1e-9);
            Assert.Equal(Number(c[i], "sd") * 9 / 5, Number(f[i], "sd"), 1e-9);
            Assert.Equal(Number(c[i], "mean") + 273.15, Number(k[i], "mean"), 1e-9);
            Assert.Equal(Number(c[i], "sd"), Number(k[i], "sd"), 1e-12);
            var lowerC = c[i].GetProperty("intervals")[0].GetProperty("lower").GetDouble();
            Assert.Equal((lowerC * 9 / 5) + 32, f[i].GetProperty("intervals")[0].GetProperty("lower").GetDouble(), 1e-9);
        }

        var pC = Probabilities(celsius);
        var pF = Probabilities(fahrenheit);
        Assert.Equal([0.0, 20.0], pC.Select(p => p.Threshold));
        Assert.Equal([32.0, 68.0], pF.Select(p => p.Threshold));
        Assert.Equal(pC.Select(p => p.Probability), pF.Select(p => p.Probability));
    }

    [Fact]
    public async Task CsvExportIsRfc4180WithOneRowPerStep()
    {
        await using var factory = await FittedAsync();
        using var client = factory.CreateAdminClient();
        var json = await client.GetJsonAsync("/api/v1/sites/units/forecast?steps=5&below=0,2.5");

        using var response = await client.GetAsync(new Uri("/api/v1/sites/units/forecast?steps=5&below=0,2.5&format=csv", UriKind.Relative));
        var text = await response.Content.ReadAsStringAsync();
        using var byAccept = new HttpRequestMessage(HttpMethod.Get, "/api/v1/sites/units/forecast?steps=5&below=0,2.5");
        byAccept.Headers.Accept.Add(new MediaTypeWithQualityHeaderValue("text/csv"));
        using var acceptAnswer = await client.SendAsync(byAccept);

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("text/csv", response.Content.Headers.ContentType?.MediaType);
        Assert.Equal("C", response.Headers.GetValues("Temperature-Unit").Single());
        Assert.EndsWith("\r\n", text, StringComparison.Ordinal);
        Assert.DoesNotContain("\n", text.Replace("\r\n", "", StringComparison.Ordinal), StringComparison.Ordinal);
        var rows = text[..^2].Split("\r\n");
        Assert.Equal("time,mean,sd,lower80,upper80,lower95,upper95,p_below_0,p_below_2.5", rows[0]);
        Assert.Equal(6, rows.Length);
        var steps = json.GetProperty("steps").EnumerateArray().ToList();
        for (var i = 0; i < steps.Count; i++)
        {
            var fields = rows[i + 1].Split(',');
            Assert.Equal(9, fields.Length);
            Assert.Equal(steps[i].GetProperty("time").GetDateTimeOffset(), DateTimeOffset.Parse(fields[0], CultureInfo.InvariantCulture));
            Assert.Equal(Number(steps[i], "mean"), double.Parse(fields[1], CultureInfo.InvariantCulture), 1e-6);
            Assert.Equal(Number(steps[i], "sd"), double.Parse(fields[2], CultureInfo.InvariantCulture), 1e-6);
            Assert.Equal(steps[i].GetProperty("intervals")[1].GetProperty("upper").GetDouble(), double.Parse(fields[6], CultureInfo.InvariantCulture), 1e-6);
            // P(X < t) for X ~ Normal(mean, sd), by MathNet.Numerics 5.0.0's normal CDF; 1e-6 is the CSV's rounding.
            var expected = MathNet.Numerics.Distributions.Normal.CDF(Number(steps[i], "mean"), Number(steps[i], "sd"), 2.5);
            Assert.Equal(expected, double.Parse(fields[8], CultureInfo.InvariantCulture), 1e-6);
            Assert.True(double.Parse(fields[7], CultureInfo.InvariantCulture) <= double.Parse(fields[8], CultureInfo.InvariantCulture));
        }

        Assert.Equal(text, await acceptAnswer.Content.ReadAsStringAsync());
    }

    [Fact]
    public async Task ChartAxisFollowsTheUnit()
    {
        await using var factory = await FittedAsync();
        using var client = factory.CreateAdminClient();

        var svg = await client.GetStringAsync(new Uri("/api/v1/sites/units/forecast.svg?unit=F", UriKind.Relative));

        var label = System.Xml.Linq.XDocument.Parse(svg).Descendants().Single(e => (string?)e.Attribute("class") == "y-label");
        Assert.Equal("Temperature (°F)", label.Value);
    }

    private static async Task<ApiFactory> FittedAsync()
    {
        var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("units");
        await factory.IngestAsync("units", ModelScenario.History(factory, days: 8));
        await client.RefitAsync("units");
        return factory;
    }

    private static double Number(JsonElement element, string name) => element.GetProperty(name).GetDouble();

    private static List<(double Threshold, double Probability)> Probabilities(JsonElement forecast) =>
        [.. forecast.GetProperty("nextDay").GetProperty("probabilities").EnumerateArray()
            .Select(p => (p.GetProperty("threshold").GetDouble(), p.GetProperty("probability").GetDouble()))];
}
