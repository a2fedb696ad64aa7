using System.Net;
using System.Net.Http.Json;
using System.Text;
using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;

namespace ForecastHub.Api.Tests.Observations;

public sealed class ObservationsTests
{
    private static readonly DateTimeOffset Now = ApiFactory.Now;

    private static async Task<(ApiFactory Factory, HttpClient Client)> WithSite(object? site = null)
    {
        var factory = new ApiFactory();
        var client = factory.CreateAdminClient();
        using var created = await client.CreateSite(site);
        Assert.Equal(HttpStatusCode.Created, created.StatusCode);
        return (factory, client);
    }

    [Fact]
    public async Task JsonBatchIsStoredAndReadBackInTimeOrder()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var readings = Some.HourlyReadings(48, Now);

        using var response = await client.PostReadings(readings.Reverse());

        var answer = await response.Json();
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal(48, answer.Count("accepted"));
        Assert.Equal(0, answer.Count("flagged"));
        Assert.Equal(0, answer.GetProperty("rejected").GetArrayLength());
        var stored = await client.AllReadings();
        Assert.Equal(readings.Select(r => Some.Iso(r.Time)), stored.Select(s => s.GetProperty("time").GetString()));
        Assert.Equal(readings.Select(r => r.Value), stored.Select(s => s.GetProperty("value").GetDouble()));
    }

    [Fact]
    public async Task DuplicateReadingIsCountedAndNotStoredTwice()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var readings = Some.HourlyReadings(10, Now);
        (await client.PostReadings(readings)).Dispose();

        using var retry = await client.PostReadings(readings);

        var answer = await retry.Json();
        Assert.Equal(HttpStatusCode.OK, retry.StatusCode);
        Assert.Equal(0, answer.Count("accepted"));
        Assert.Equal(10, answer.Count("duplicates"));
        Assert.Equal(10, (await client.AllReadings()).Count);
    }

    [Fact]
    public async Task ConflictingValueIsRejectedUnlessReplaceIsAsked()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var time = Now.AddHours(-2);
        (await client.PostReadings([(time, 5.0), (time.AddHours(1), 6.0)])).Dispose();

        using var refused = await client.PostReadings([(time, 7.0), (time.AddHours(1), 6.0)]);
        var afterRefusal = await client.AllReadings();
        using var replaced = await client.PostReadings([(time, 7.0)], query: "?onConflict=replace");

        var refusedAnswer = await refused.Json();
        Assert.Equal(1, refusedAnswer.Count("duplicates"));
        var conflict = refusedAnswer.GetProperty("rejected").EnumerateArray().Single();
        Assert.Equal(0, conflict.GetProperty("index").GetInt32());
        Assert.Contains("onConflict=replace", conflict.GetProperty("reason").GetString(), StringComparison.Ordinal);
        Assert.Equal(5.0, afterRefusal[0].GetProperty("value").GetDouble());
        Assert.Equal(1, (await replaced.Json()).Count("replaced"));
        Assert.Equal(7.0, (await client.AllReadings())[0].GetProperty("value").GetDouble());
    }

    [Fact]
    public async Task FahrenheitAndKelvinAreConvertedAndTheOriginalIsKept()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var t = Now.AddHours(-3);
        var body = $$"""
            {"unit":"F","readings":[
              {"time":"{{Some.Iso(t)}}","value":50},
              {"time":"{{Some.Iso(t.AddHours(1))}}","value":283.15,"unit":"K"}]}
            """;

        (await client.PostRaw(body, "application/json")).Dispose();
        (await client.PostReadings([(t.AddHours(2), 41.0)], query: "?unit=F")).Dispose();

        var stored = await client.AllReadings();
        Assert.Equal([10.0, 10.0, 5.0], stored.Select(s => Math.Round(s.GetProperty("value").GetDouble(), 9)));
        Assert.Equal(["F", "K", "F"], stored.Select(s => s.GetProperty("originalUnit").GetString()));
        Assert.Equal([50.0, 283.15, 41.0], stored.Select(s => s.GetProperty("originalValue").GetDouble()));
    }

    [Fact]
    public async Task CsvWithBomCrlfQuotedFieldsAndAUnitColumnIsAccepted()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var t = Now.AddHours(-3);
        var csv = "\uFEFFTime,Value,Unit\r\n"
                  + $"\"{Some.Iso(t)}\",\"12.5\",C\r\n"
                  + $"{Some.Iso(t.AddHours(1))},54.5,\"F\"\r\n"
                  + "\r\n"
                  + $"{Some.Iso(t.AddHours(2))},13,\r\n";

        using var response = await client.PostRaw(csv, "text/csv");

        var answer = await response.Json();
        Assert.Equal(3, answer.Count("accepted"));
        Assert.Equal([12.5, 12.5, 13.0], (await client.AllReadings()).Select(s => Math.Round(s.GetProperty("value").GetDouble(), 9)));
    }

    [Fact]
    public async Task BadCsvRowsAreReportedWithLineNumbersAndGoodRowsAreStored()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var t = Now.AddHours(-5);
        var csv = "time,value\n"
                  + $"{Some.Iso(t)},10\n"
                  + "2025-02-30T00:00:00Z,10\n"
                  + $"{Some.Iso(t.AddHours(1))},abc\n"
                  + $"{Some.Iso(t.AddHours(2))},10,C\n"
                  + $"{Some.Iso(t.AddHours(3)).TrimEnd('Z')},10\n"
                  + $"{Some.Iso(t.AddHours(4))},11\n";

        using var response = await client.PostRaw(csv, "text/csv");

        var answer = await response.Json();
        Assert.Equal(2, answer.Count("accepted"));
        var rejected = answer.GetProperty("rejected").EnumerateArray().ToList();
        Assert.Equal([3, 4, 5, 6], rejected.Select(r => r.GetProperty("line").GetInt32()));
        Assert.Equal([1, 2, 3, 4], rejected.Select(r => r.GetProperty("index").GetInt32()));
        Assert.Contains("calendar date", rejected[0].GetProperty("reason").GetString(), StringComparison.Ordinal);
        Assert.Contains("not a number", rejected[1].GetProperty("reason").GetString(), StringComparison.Ordinal);
        Assert.Contains("fields", rejected[2].GetProperty("reason").GetString(), StringComparison.Ordinal);
        Assert.Contains("no UTC offset", rejected[3].GetProperty("reason").GetString(), StringComparison.Ordinal);
        Assert.Equal(2, (await client.AllReadings()).Count);
    }

    [Fact]
    public async Task ValueOutsideThePhysicalRangeIsRejectedAndOutsideTheSiteLimitsIsFlagged()
    {
        var (factory, client) = await WithSite(Some.Site(quality: new { minC = -10.0, maxC = 40.0 }));
        await using var _ = factory;
        var t = Now.AddHours(-3);

        using var response = await client.PostReadings([(t, 45.0), (t.AddHours(1), 70.0), (t.AddHours(2), 30.0)]);

        var answer = await response.Json();
        Assert.Equal(2, answer.Count("accepted"));
        Assert.Equal(1, answer.Count("flagged"));
        var rejected = answer.GetProperty("rejected").EnumerateArray().Single();
        Assert.Equal(1, rejected.GetProperty("index").GetInt32());
        Assert.Contains("physical range", rejected.GetProperty("reason").GetString(), StringComparison.Ordinal);
        var stored = await client.AllReadings();
        Assert.Equal(["out-of-range"], stored[0].GetProperty("flags").EnumerateArray().Select(f => f.GetString()));
        Assert.Empty(stored[1].GetProperty("flags").EnumerateArray());
    }

    [Fact]
    public async Task ReadingMoreThanTenMinutesAheadOfTheClockIsRejected()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;

        using var response = await client.PostReadings([(Now.AddMinutes(9), 10.0), (Now.AddMinutes(11), 10.0)]);

        var answer = await response.Json();
        Assert.Equal(1, answer.Count("accepted"));
        Assert.Contains("ahead", answer.GetProperty("rejected")[0].GetProperty("reason").GetString(), StringComparison.Ordinal);
        factory.Clock.Advance(TimeSpan.FromMinutes(5));
        using var later = await client.PostReadings([(Now.AddMinutes(11), 10.0)]);
        Assert.Equal(1, (await later.Json()).Count("accepted"));
    }

    [Fact]
    public async Task SpikeIsFlaggedOnceItsLaterNeighbourArrives()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var t = Now.AddHours(-5);
        (await client.PostReadings([(t, 10.0), (t.AddHours(1), 10.5)])).Dispose();
        (await client.PostReadings([(t.AddHours(2), 35.0)])).Dispose();
        var before = await client.AllReadings();

        using var response = await client.PostReadings([(t.AddHours(3), 11.0)]);

        Assert.Empty(before[2].GetProperty("flags").EnumerateArray());
        var stored = await client.AllReadings();
        Assert.Equal(["spike"], stored[2].GetProperty("flags").EnumerateArray().Select(f => f.GetString()));
        Assert.All(stored.Where((_, i) => i != 2), s => Assert.Empty(s.GetProperty("flags").EnumerateArray()));
    }

    [Fact]
    public async Task FlatLineIsFlaggedAcrossBatchesIncludingTheStoredReadings()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var t = Now.AddHours(-10);
        (await client.PostReadings(Enumerable.Range(0, 4).Select(i => (t.AddHours(i), 7.25)))).Dispose();

        using var response = await client.PostReadings(Enumerable.Range(4, 3).Select(i => (t.AddHours(i), 7.25)));

        Assert.Equal(3, (await response.Json()).Count("flagged"));
        var stored = await client.AllReadings();
        Assert.All(stored, s => Assert.Equal(["flat-line"], s.GetProperty("flags").EnumerateArray().Select(f => f.GetString())));
    }

    [Fact]
    public async Task EveryRowRejectedIsA422ProblemListingTheRows()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;

        using var response = await client.PostRaw("""{"readings":[{"time":"2025-01-01T00:00:00","value":1}]}""", "application/json");

        var problem = await ProblemAssert.IsProblem(response, HttpStatusCode.UnprocessableEntity);
        Assert.Contains("no UTC offset", problem.GetProperty("rejected")[0].GetProperty("reason").GetString(), StringComparison.Ordinal);
    }

    [Fact]
    public async Task PostingWithoutAKeyIsRefused()
    {
        var (factory, _) = await WithSite();
        await using var __ = factory;
        using var anonymous = factory.CreateClient();

        using var response = await anonymous.PostReadings(Some.HourlyReadings(2, Now));

        await ProblemAssert.IsProblem(response, HttpStatusCode.Unauthorized);
    }

    [Fact]
    public async Task PostingToAnUnknownSiteIsNotFound()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();

        using var response = await client.PostReadings(Some.HourlyReadings(2, Now), siteId: "nowhere");

        await ProblemAssert.IsProblem(response, HttpStatusCode.NotFound);
    }

    [Fact]
    public async Task RawReadingsPageByNextLinksToTheEndInJsonAndCsv()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var readings = Some.HourlyReadings(250, Now);
        (await client.PostReadings(readings)).Dispose();

        var json = await client.AllReadings(limit: 60);
        var csvRows = new List<string>();
        var next = "/api/v1/sites/orchard-1/observations?limit=100&format=csv";
        while (next is not null)
        {
            using var page = await client.GetAsync(new Uri(next, UriKind.Relative));
            Assert.Equal("text/csv", page.Content.Headers.ContentType?.MediaType);
            var lines = (await page.Content.ReadAsStringAsync()).Split("\r\n", StringSplitOptions.RemoveEmptyEntries);
            Assert.Equal("time,value,originalValue,originalUnit,flags", lines[0]);
            csvRows.AddRange(lines.Skip(1));
            next = page.Headers.TryGetValues("Link", out var link) ? link.Single().Split('>')[0].TrimStart('<') : null;
        }

        Assert.Equal(250, json.Count);
        Assert.Equal(readings.Select(r => Some.Iso(r.Time)), json.Select(s => s.GetProperty("time").GetString()));
        Assert.Equal(readings.Select(r => Some.Iso(r.Time)), csvRows.Select(l => l.Split(',')[0]));
    }

    [Fact]
    public async Task FromAndToSelectAHalfOpenTimeRange()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var readings = Some.HourlyReadings(10, Now);
        (await client.PostReadings(readings)).Dispose();
        var from = Uri.EscapeDataString(Some.Iso(readings[2].Time));
        var to = Uri.EscapeDataString(Some.Iso(readings[5].Time));

        var page = await client.GetFromJsonAsync<JsonElement>(new Uri($"/api/v1/sites/orchard-1/observations?from={from}&to={to}", UriKind.Relative));

        Assert.Equal(readings.Skip(2).Take(3).Select(r => Some.Iso(r.Time)),
            page.GetProperty("readings").EnumerateArray().Select(r => r.GetProperty("time").GetString()));
    }

    [Fact]
    public async Task QueryNamesAreReadWithoutRegardToCaseAsTheDocumentSpellsThemLowerCase()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var readings = Some.HourlyReadings(10, Now);
        (await client.PostReadings(readings)).Dispose();
        var from = Uri.EscapeDataString(Some.Iso(readings[2].Time));
        var to = Uri.EscapeDataString(Some.Iso(readings[5].Time));

        var lower = await client.GetFromJsonAsync<JsonElement>(new Uri($"/api/v1/sites/orchard-1/observations?from={from}&to={to}&limit=2", UriKind.Relative));
        var capitalised = await client.GetFromJsonAsync<JsonElement>(new Uri($"/api/v1/sites/orchard-1/observations?From={from}&TO={to}&Limit=2", UriKind.Relative));

        string[] Times(JsonElement page) => [.. page.GetProperty("readings").EnumerateArray().Select(r => r.GetProperty("time").GetString()!)];
        Assert.Equal(readings.Skip(2).Take(2).Select(r => Some.Iso(r.Time)), Times(lower));
        Assert.Equal(Times(lower), Times(capitalised));
        Assert.NotNull(lower.GetProperty("next").GetString());
    }

    [Fact]
    public async Task GridAveragesEachHourInterpolatesShortGapsAndLeavesLongGapsEmpty()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var t = new DateTimeOffset(2025, 5, 1, 0, 0, 0, TimeSpan.Zero);
        var readings = new List<(DateTimeOffset, double)> { (t, 10), (t.AddMinutes(30), 12), (t.AddHours(1), 13), (t.AddHours(4), 16) };
        readings.AddRange(Enumerable.Range(0, 3).Select(i => (t.AddHours(10 + i), 20.0 + i)));
        (await client.PostReadings(readings)).Dispose();

        var grid = await client.GetFromJsonAsync<JsonElement>(new Uri("/api/v1/sites/orchard-1/observations?resolution=grid", UriKind.Relative));

        var points = grid.GetProperty("points").EnumerateArray().ToList();
        Assert.Equal(13, points.Count);
        Assert.Equal("2025-05-01T02:00:00+02:00", points[0].GetProperty("time").GetString());
        Assert.Equal(11.0, points[0].GetProperty("value").GetDouble());
        Assert.Equal(14.0, points[2].GetProperty("value").GetDouble(), 9);
        Assert.True(points[2].GetProperty("interpolated").GetBoolean());
        Assert.Equal(JsonValueKind.Null, points[6].GetProperty("value").ValueKind);
        Assert.Equal(22.0, points[12].GetProperty("value").GetDouble());
    }

    [Fact]
    public async Task GridPagesJoinUpToTheWholeGrid()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;
        var readings = Some.HourlyReadings(100, Now).Where((_, i) => i % 5 != 2).ToList();
        (await client.PostReadings(readings)).Dispose();

        var whole = await client.GetFromJsonAsync<JsonElement>(new Uri("/api/v1/sites/orchard-1/observations?resolution=grid", UriKind.Relative));
        var paged = new List<JsonElement>();
        string? next = "/api/v1/sites/orchard-1/observations?resolution=grid&limit=7";
        while (next is not null)
        {
            var page = await client.GetFromJsonAsync<JsonElement>(new Uri(next, UriKind.Relative));
            paged.AddRange(page.GetProperty("points").EnumerateArray());
            next = page.GetProperty("next").GetString();
        }

        Assert.Equal(whole.GetProperty("points").EnumerateArray().Select(p => p.GetRawText()), paged.Select(p => p.GetRawText()));
        Assert.Equal(100, paged.Count);
        Assert.All(paged, p => Assert.NotEqual(JsonValueKind.Null, p.GetProperty("value").ValueKind));
    }

    [Fact]
    public async Task BadQueryParametersAreProblemsNamingTheParameter()
    {
        var (factory, client) = await WithSite();
        await using var _ = factory;

        foreach (var (query, field) in new[] { ("from=yesterday", "from"), ("limit=0", "limit"), ("limit=abc", "limit"),
                     ("resolution=weekly", "resolution"), ("cursor=xyz", "cursor"), ("format=xml", "format"),
                     ("from=2025-01-02T00:00:00Z&to=2025-01-01T00:00:00Z", "to") })
        {
            using var response = await client.GetAsync(new Uri($"/api/v1/sites/orchard-1/observations?{query}", UriKind.Relative));
            await ProblemAssert.NamesField(response, HttpStatusCode.BadRequest, field);
        }
        using var post = await client.PostReadings(Some.HourlyReadings(1, Now), query: "?onConflict=merge");
        await ProblemAssert.NamesField(post, HttpStatusCode.BadRequest, "onConflict");
    }
}
