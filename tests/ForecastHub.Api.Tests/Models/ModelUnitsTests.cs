using System.Net;
using System.Text.Json;
using ForecastHub.Api.Models;
using ForecastHub.Api.Tests.Infrastructure;

namespace ForecastHub.Api.Tests.Models;

/// <summary><c>unit=C|F|K</c> on <c>GET .../model</c> and <c>POST .../model/refit</c>: which terms convert and how.</summary>
public sealed class ModelUnitsTests
{
    [Fact]
    public async Task FahrenheitAndKelvinModelsAreTheCelsiusModelConverted()
    {
        await using var factory = await FittedAsync();
        using var client = factory.CreateAdminClient();

        var c = await client.GetJsonAsync("/api/v1/sites/units/model");
        var f = await client.GetJsonAsync("/api/v1/sites/units/model?unit=F");
        var k = await client.GetJsonAsync("/api/v1/sites/units/model?unit=K");

        Assert.Equal(("C", "F", "K"), (Text(c, "unit"), Text(f, "unit"), Text(k, "unit")));
        var terms = Terms(c);
        Assert.Equal("level", terms[0].Name);
        Assert.Contains(terms, t => t.Name == "diurnal-cos-1");
        // F = C * 9/5 + 32 and K = C + 273.15 for the level (a temperature); amplitudes, standard errors,
        // the AR mean (of anomalies) and the residuals' mean and sd are differences: * 9/5 in F, unchanged in K;
        // the innovation variance is in squared degrees: * 81/25 in F. Exact conversions; 1e-9 allows for rounding of the doubles.
        foreach (var ((name, value, stdError), fahrenheit, kelvin) in terms.Zip(Terms(f), Terms(k)))
        {
            Assert.Equal(name, fahrenheit.Name);
            Assert.Equal(name == "level" ? (value * 9 / 5) + 32 : value * 9 / 5, fahrenheit.Value, 1e-9);
            Assert.Equal(name == "level" ? value + 273.15 : value, kelvin.Value, 1e-9);
            Assert.Equal(stdError * 9 / 5, fahrenheit.StdError, 1e-9);
            Assert.Equal(stdError, kelvin.StdError, 1e-12);
        }
        Assert.Equal(Number(c, "ar", "mean") * 9 / 5, Number(f, "ar", "mean"), 1e-9);
        Assert.Equal(Number(c, "ar", "mean"), Number(k, "ar", "mean"), 1e-12);
        Assert.Equal(Number(c, "ar", "innovationVariance") * 81 / 25, Number(f, "ar", "innovationVariance"), 1e-9);
        Assert.Equal(Number(c, "ar", "innovationVariance"), Number(k, "ar", "innovationVariance"), 1e-12);
        Assert.Equal(Number(c, "residuals", "sd") * 9 / 5, Number(f, "residuals", "sd"), 1e-9);
        Assert.Equal(Number(c, "residuals", "mean") * 9 / 5, Number(f, "residuals", "mean"), 1e-9);
        // Unitless: AR coefficients, roots, correlations, statistics and the criteria of the fit are the same in every unit.
        foreach (var unitless in new[] { "coefficients", "roots" })
        {
            Assert.Equal(c.GetProperty("ar").GetProperty(unitless).GetRawText(), f.GetProperty("ar").GetProperty(unitless).GetRawText());
        }
        Assert.Equal(c.GetProperty("orderSelection").GetRawText(), f.GetProperty("orderSelection").GetRawText());
        Assert.Equal(c.GetProperty("acf").GetRawText(), k.GetProperty("acf").GetRawText());
        Assert.Equal(Number(c, "residuals", "kurtosis"), Number(f, "residuals", "kurtosis"));
    }

    [Fact]
    public void ConversionOfAKnownModelGivesHandComputedValues()
    {
        var model = Model(level: 10, amplitude: -4.5, stdError: 0.25, arMean: 0.1, innovationVariance: 2, residualSd: 1.5);

        var f = ModelUnits.InUnit(model, "F");
        var k = ModelUnits.InUnit(model, "K");

        // By hand: 10 C = 50 F = 283.15 K; -4.5 C of amplitude = -8.1 F; 0.25 -> 0.45; 0.1 -> 0.18; 2 C^2 = 6.48 F^2; 1.5 -> 2.7.
        Assert.Equal([50, -8.1], f.Seasonality.Terms.Select(t => Math.Round(t.Value, 12)));
        Assert.Equal([0.45, 0.45], f.Seasonality.Terms.Select(t => Math.Round(t.StdError, 12)));
        Assert.Equal((0.18, 6.48, 2.7), (Math.Round(f.Ar.Mean, 12), Math.Round(f.Ar.InnovationVariance, 12), Math.Round(f.Residuals.Sd, 12)));
        Assert.Equal([283.15, -4.5], k.Seasonality.Terms.Select(t => Math.Round(t.Value, 12)));
        Assert.Equal((0.1, 2.0, 1.5), (k.Ar.Mean, k.Ar.InnovationVariance, k.Residuals.Sd));
        Assert.Equal(model.Ar.Coefficients, f.Ar.Coefficients);
        Assert.Same(model, ModelUnits.InUnit(model, "C"));
    }

    [Fact]
    public async Task RefitAnswersTheNewModelInTheAskedUnit()
    {
        await using var factory = await FittedAsync();
        using var client = factory.CreateAdminClient();

        using var response = await client.PostAsync(new Uri("/api/v1/sites/units/model/refit?unit=K", UriKind.Relative), null);
        var refitted = JsonDocument.Parse(await response.Content.ReadAsStringAsync()).RootElement;
        var c = await client.GetJsonAsync("/api/v1/sites/units/model");

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("K", Text(refitted, "unit"));
        Assert.Equal(c.GetProperty("fittedAt").GetDateTimeOffset(), refitted.GetProperty("fittedAt").GetDateTimeOffset());
        Assert.Equal(Terms(c)[0].Value + 273.15, Terms(refitted)[0].Value, 1e-9);
    }

    [Theory]
    [InlineData("GET", "/api/v1/sites/units/model?unit=R", "unit")]
    [InlineData("GET", "/api/v1/sites/units/model?unit=f", "unit")]
    [InlineData("GET", "/api/v1/sites/units/model?units=F", "units")]
    [InlineData("POST", "/api/v1/sites/units/model/refit?unit=celsius", "unit")]
    [InlineData("POST", "/api/v1/sites/units/model/refit?step=3", "step")]
    public async Task BadUnitOrUnknownParameterIsRefusedByNameAndRefitsNothing(string method, string path, string field)
    {
        await using var factory = await FittedAsync();
        using var client = factory.CreateAdminClient();
        var before = await client.GetJsonAsync("/api/v1/sites/units/model");

        using var response = await client.SendAsync(new HttpRequestMessage(new HttpMethod(method), new Uri(path, UriKind.Relative)));

        await ProblemAssert.NamesField(response, HttpStatusCode.BadRequest, field);
        var after = await client.GetJsonAsync("/api/v1/sites/units/model");
        Assert.Equal(before.GetProperty("fittedAt").GetDateTimeOffset(), after.GetProperty("fittedAt").GetDateTimeOffset());
        Assert.Equal(before.GetProperty("lastAttempt").GetRawText(), after.GetProperty("lastAttempt").GetRawText());
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

    private static ModelResponse Model(double level, double amplitude, double stdError, double arMean, double innovationVariance, double residualSd) => new(
        "units", "C", DateTimeOffset.UnixEpoch, 12, 1,
        new ModelSettingsUsed("diurnal", "burg", "pacf-aic", 5, 30, "gaussian"),
        new ModelWindow(DateTimeOffset.UnixEpoch, DateTimeOffset.UnixEpoch.AddDays(8), 192, 0, 1),
        new SeasonalityResponse("auto", "diurnal", 0, 1, "ols", [new TermResponse("level", level, stdError), new TermResponse("diurnal-cos-1", amplitude, stdError)], "constant"),
        new ArResponse("burg", 1, arMean, [new CoefficientResponse(1, 0.8, 0.04)], innovationVariance, [new RootResponse(1.25, 0, 1.25)], true),
        new OrderSelectionResponse("pacf-aic", 5, 0.14, 1, [], [], 1, "all points"),
        [], new ResidualsResponse(null, null, 0, residualSd, 0, 3), new IntervalsResponse("gaussian", null), [], null);

    private static string? Text(JsonElement element, string name) => element.GetProperty(name).GetString();

    private static double Number(JsonElement element, string group, string name) => element.GetProperty(group).GetProperty(name).GetDouble();

    private static List<(string Name, double Value, double StdError)> Terms(JsonElement model) =>
        [.. model.GetProperty("seasonality").GetProperty("terms").EnumerateArray()
            .Select(t => (t.GetProperty("name").GetString()!, t.GetProperty("value").GetDouble(), t.GetProperty("stdError").GetDouble()))];
}
