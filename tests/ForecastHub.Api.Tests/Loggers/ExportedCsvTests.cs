using System.Globalization;
using System.Net;
using System.Text;
using ForecastHub.Api.Tests.Infrastructure;

namespace ForecastHub.Api.Tests.Loggers;

/// <summary>CSV files posted as loggers export them: other separators and decimal marks, extra columns,
/// columns by name or position, local times in the site's zone (Europe/Berlin), and the unit check.</summary>
public sealed class ExportedCsvTests
{
    private static async Task<(ApiFactory Factory, HttpClient Client)> WithSite(object? quality = null)
    {
        var factory = new ApiFactory();
        var client = factory.CreateAdminClient();
        using var created = await client.CreateSite(Some.Site(quality: quality));
        Assert.Equal(HttpStatusCode.Created, created.StatusCode);
        return (factory, client);
    }

    [Fact]
    public async Task SemicolonExportWithDecimalCommasAndExtraColumnsIsReadByColumnNameAndPosition()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var csv = "Datum;Logger;Temperatur;Einheit;Batterie\r\n"
                  + "2025-05-31T10:00:00+02:00;L-7;12,5;°C;3,1\r\n"
                  + "2025-05-31T11:00:00+02:00;L-7;54,5;°F;3,1\r\n"
                  + "2025-05-31T12:00:00+02:00;L-7;1.5;°C;3,1\r\n";

        using var response = await client.PostRaw(csv, "text/csv",
            query: "?separator=%3B&decimal=%2C&timeColumn=Datum&valueColumn=3&unitColumn=Einheit");

        var answer = await response.Json();
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal(2, answer.Count("accepted"));
        var rejected = answer.GetProperty("rejected").EnumerateArray().Single();
        Assert.Equal(4, rejected.GetProperty("line").GetInt32());
        Assert.Contains("decimal mark is ','", rejected.GetProperty("reason").GetString(), StringComparison.Ordinal);
        var stored = await client.AllReadings();
        Assert.Equal(["2025-05-31T08:00:00Z", "2025-05-31T09:00:00Z"], stored.Select(s => s.GetProperty("time").GetString()));
        Assert.Equal(12.5, stored[0].GetProperty("value").GetDouble());
        Assert.Equal(12.5, stored[1].GetProperty("value").GetDouble(), 9); // 54.5 F
        Assert.Equal("F", stored[1].GetProperty("originalUnit").GetString());
    }

    [Fact]
    public async Task TabSeparatedExportIsReadByPositions()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var csv = "n\tstamp\ttemp\n1\t2025-05-31T10:00:00Z\t11.25\n2\t2025-05-31T11:00:00Z\t11.5\n";

        using var response = await client.PostRaw(csv, "text/csv", query: "?separator=tab&timeColumn=2&valueColumn=3");

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal(2, (await response.Json()).Count("accepted"));
    }

    [Theory]
    [InlineData("?timeColumn=Zeit", "no column 'Zeit' (timeColumn)")]
    [InlineData("?separator=pipe", "separator must be")]
    [InlineData("?decimal=%2C", "the decimal mark cannot be the field separator")]
    public async Task ALayoutThatDoesNotFitTheFileIsRefusedWithTheHeaderItFound(string query, string reason)
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;

        using var response = await client.PostRaw("time,value\r\n2025-05-31T10:00:00Z,11.25\r\n", "text/csv", query: query);

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Contains(reason, (await response.Content.ReadAsStringAsync()), StringComparison.Ordinal);
        Assert.Empty(await client.AllReadings());
    }

    [Fact]
    public async Task LocalTimesAreReadInTheSiteZoneWithTheRepeatedHourAsAPairAndTheSkippedHourRejected()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        // Europe/Berlin: clocks go back at 03:00 CEST on 2024-10-27 (02:00-02:59 twice) and forward at 02:00 CET on 2025-03-30.
        var csv = "time,value\n"
                  + "2024-10-27 01:30,9.0\n"
                  + "2024-10-27 02:30,8.5\n"
                  + "2024-10-27 02:30,8.25\n"
                  + "2024-10-27 03:30,8.0\n"
                  + "2024-10-27T02:45:00+01:00,8.1\n"
                  + "2024-10-27 02:15,8.4\n"
                  + "2025-03-30 02:30,3.0\n";

        using var response = await client.PostRaw(csv, "text/csv", query: "?localTimes=true");

        var answer = await response.Json();
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal(5, answer.Count("accepted"));
        var reasons = answer.GetProperty("rejected").EnumerateArray().ToDictionary(r => r.GetProperty("line").GetInt32(), r => r.GetProperty("reason").GetString()!);
        Assert.Contains("occurs twice in Europe/Berlin", reasons[7], StringComparison.Ordinal);
        Assert.Contains("does not exist in Europe/Berlin", reasons[8], StringComparison.Ordinal);
        var stored = (await client.AllReadings()).Select(s => (s.GetProperty("time").GetString(), s.GetProperty("value").GetDouble())).ToList();
        Assert.Equal(
            [("2024-10-26T23:30:00Z", 9.0), ("2024-10-27T00:30:00Z", 8.5), ("2024-10-27T01:30:00Z", 8.25), ("2024-10-27T01:45:00Z", 8.1), ("2024-10-27T02:30:00Z", 8.0)],
            stored);
    }

    [Fact]
    public async Task TimesWithoutAnOffsetAreStillRefusedUnlessLocalTimesIsAsked()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;

        using var response = await client.PostRaw("time,value\n2025-05-31 10:00,9.0\n", "text/csv");

        Assert.Equal(HttpStatusCode.UnprocessableEntity, response.StatusCode);
        Assert.Contains("has no UTC offset", await response.Content.ReadAsStringAsync(), StringComparison.Ordinal);
    }

    [Fact]
    public async Task AFahrenheitBatchSentAsCelsiusIsRefusedWholeWithTheUnitItLooksLike()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        // Two June days in Fahrenheit (58..84 F): read as C most lie above the site's 60 C limit and the median is about 71 C.
        var readings = Enumerable.Range(0, 48)
            .Select(h => (Time: ApiFactory.Now.AddHours(-48 + h), Value: Math.Round(71 + (13 * Math.Sin(2 * Math.PI * (h - 9) / 24)), 1)))
            .ToList();

        using var refused = await client.PostReadings(readings);
        var body = await refused.Content.ReadAsStringAsync();
        var storedAfterRefusal = await client.AllReadings();
        using var accepted = await client.PostReadings(readings, query: "?unit=F");

        Assert.Equal(HttpStatusCode.UnprocessableEntity, refused.StatusCode);
        Assert.Contains("application/problem+json", refused.Content.Headers.ContentType?.ToString(), StringComparison.Ordinal);
        Assert.Contains("send unit=F", body, StringComparison.Ordinal);
        Assert.Contains("of the 48 values", body, StringComparison.Ordinal);
        Assert.Empty(storedAfterRefusal);
        Assert.Equal(HttpStatusCode.OK, accepted.StatusCode);
        Assert.Equal(48, (await accepted.Json()).Count("accepted"));
    }

    [Fact]
    public async Task AKelvinCsvWithoutAUnitIsRefusedAndAPlausibleCelsiusBatchIsNot()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var kelvin = Some.Csv(Some.HourlyReadings(24, ApiFactory.Now).Select(r => (r.Time, r.Value + 273.15)));
        var celsius = Some.Csv(Some.HourlyReadings(24, ApiFactory.Now, level: 38));

        using var refused = await client.PostRaw(kelvin, "text/csv");
        using var stored = await client.PostRaw(celsius, "text/csv");

        Assert.Equal(HttpStatusCode.UnprocessableEntity, refused.StatusCode);
        Assert.Contains("send unit=K", await refused.Content.ReadAsStringAsync(), StringComparison.Ordinal);
        Assert.Equal(HttpStatusCode.OK, stored.StatusCode);
    }

    [Theory]
    [InlineData("C", 140, "value 140 C is outside the physical range -95..65 C; check the unit: as F it would be 60 C.")]
    [InlineData("F", 200, "value 200 F (93.33 C) is outside the physical range -95..65 C; check the unit.")]
    public async Task AValueOutsideThePhysicalRangeIsReportedAsSentAndAsConverted(string unit, double value, string reason)
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;

        using var response = await client.PostReadings([(ApiFactory.Now.AddHours(-1), value), (ApiFactory.Now.AddHours(-2), 10)], query: $"?unit={unit}");

        var answer = await response.Json();
        Assert.Equal(reason, answer.GetProperty("rejected")[0].GetProperty("reason").GetString());
    }
}
