using System.Globalization;
using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;

namespace ForecastHub.Api.Tests.Observations;

/// <summary><c>unit=C|F|K</c> on <c>GET .../observations</c>: stored and grid values converted, the original as sent.</summary>
public sealed class ObservationUnitsTests
{
    // 2025-05-01 in Europe/Berlin (the test site's zone): hours of whole degrees C.
    private static readonly DateTimeOffset Start = new(2025, 5, 1, 0, 0, 0, TimeSpan.Zero);

    [Fact]
    public async Task RawReadingsInFahrenheitAndKelvinAreTheStoredCelsiusConverted()
    {
        await using var factory = new ApiFactory();
        using var client = await WithReadings(factory);

        var f = await Page(client, "?unit=F&limit=2");
        var k = await Page(client, "?unit=K");

        // By hand: 10 C = 50 F = 283.15 K; 12.5 C = 54.5 F; the reading sent as 59 F (15 C) keeps its original value and unit.
        Assert.Equal("F", f.GetProperty("unit").GetString());
        Assert.Equal([50.0, 54.5], Values(f, "readings"));
        Assert.Contains("unit=F", f.GetProperty("next").GetString(), StringComparison.Ordinal);
        Assert.Equal("K", k.GetProperty("unit").GetString());
        Assert.Equal([283.15, 285.65, 288.15], Values(k, "readings"));
        var sentInF = k.GetProperty("readings")[2];
        Assert.Equal((59.0, "F"), (sentInF.GetProperty("originalValue").GetDouble(), sentInF.GetProperty("originalUnit").GetString()));
    }

    [Fact]
    public async Task GridAndCsvFollowTheUnit()
    {
        await using var factory = new ApiFactory();
        using var client = await WithReadings(factory);

        var grid = await Page(client, "?resolution=grid&unit=F");
        using var csv = await client.GetAsync(new Uri("/api/v1/sites/orchard-1/observations?format=csv&unit=F", UriKind.Relative));
        var rows = (await csv.Content.ReadAsStringAsync()).TrimEnd('\n', '\r').Split("\r\n").Skip(1).Select(r => r.Split(',')).ToList();

        Assert.Equal(("grid", "F"), (grid.GetProperty("resolution").GetString(), grid.GetProperty("unit").GetString()));
        Assert.Equal([50.0, 54.5, 59.0], Values(grid, "points"));
        Assert.Equal("F", csv.Headers.GetValues("Temperature-Unit").Single());
        Assert.Equal([50.0, 54.5, 59.0], rows.Select(r => double.Parse(r[1], CultureInfo.InvariantCulture)).Select(v => Math.Round(v, 9)));
        Assert.Equal(["10", "12.5", "59"], rows.Select(r => r[2]));
    }

    [Theory]
    [InlineData("?unit=R", "unit")]
    [InlineData("?unit=c", "unit")]
    [InlineData("?units=F", "units")]
    [InlineData("?resolution=grid&step=1", "step")]
    public async Task BadUnitOrUnknownParameterIsRefusedByName(string query, string field)
    {
        await using var factory = new ApiFactory();
        using var client = await WithReadings(factory);

        using var response = await client.GetAsync(new Uri("/api/v1/sites/orchard-1/observations" + query, UriKind.Relative));

        await ProblemAssert.NamesField(response, HttpStatusCode.BadRequest, field);
    }

    private static async Task<HttpClient> WithReadings(ApiFactory factory)
    {
        var client = factory.CreateAdminClient();
        using var created = await client.CreateSite();
        Assert.Equal(HttpStatusCode.Created, created.StatusCode);
        using var celsius = await client.PostReadings([(Start, 10), (Start.AddHours(1), 12.5)]);
        using var fahrenheit = await client.PostReadings([(Start.AddHours(2), 59)], unit: "F");
        Assert.Equal((HttpStatusCode.OK, HttpStatusCode.OK), (celsius.StatusCode, fahrenheit.StatusCode));
        return client;
    }

    private static async Task<JsonElement> Page(HttpClient client, string query) =>
        await client.GetFromJsonAsync<JsonElement>(new Uri("/api/v1/sites/orchard-1/observations" + query, UriKind.Relative));

    // Rounded to 1e-9: the conversions are exact up to the doubles' rounding.
    private static double[] Values(JsonElement page, string list) =>
        [.. page.GetProperty(list).EnumerateArray().Select(r => Math.Round(r.GetProperty("value").GetDouble(), 9))];
}
