using System.Net;
using System.Text;
using ForecastHub.Api.Tests.Infrastructure;

namespace ForecastHub.Api.Tests.Observations;

/// <summary>Each hostile request gets a 4xx problem, the readings stored before it are unchanged,
/// and the service still answers.</summary>
public sealed class HostileInputTests
{
    private const string T = "2025-05-31T10:00:00Z";

    public static TheoryData<string, string, string, HttpStatusCode> Bodies => new()
    {
        { "truncated JSON", "application/json", "{\"readings\":[{\"time\":\"" + T + "\",\"value\":1", HttpStatusCode.BadRequest },
        { "broken JSON", "application/json", "{readings: [}", HttpStatusCode.BadRequest },
        { "empty body", "application/json", "", HttpStatusCode.BadRequest },
        { "readings not an array", "application/json", "{\"readings\":\"many\"}", HttpStatusCode.BadRequest },
        { "top-level array", "application/json", "[1,2,3]", HttpStatusCode.BadRequest },
        { "unknown top-level field", "application/json", "{\"readings\":[],\"sensor\":1}", HttpStatusCode.BadRequest },
        { "empty readings", "application/json", "{\"readings\":[]}", HttpStatusCode.BadRequest },
        { "value as string", "application/json", Row($"\"time\":\"{T}\",\"value\":\"12\""), HttpStatusCode.UnprocessableEntity },
        { "time as number", "application/json", Row("\"time\":1717000000,\"value\":12"), HttpStatusCode.UnprocessableEntity },
        { "value null", "application/json", Row($"\"time\":\"{T}\",\"value\":null"), HttpStatusCode.UnprocessableEntity },
        { "reading not an object", "application/json", "{\"readings\":[12.5]}", HttpStatusCode.UnprocessableEntity },
        { "NaN literal", "application/json", Row($"\"time\":\"{T}\",\"value\":NaN"), HttpStatusCode.BadRequest },
        { "Infinity literal", "application/json", Row($"\"time\":\"{T}\",\"value\":Infinity"), HttpStatusCode.BadRequest },
        { "1e400", "application/json", Row($"\"time\":\"{T}\",\"value\":1e400"), HttpStatusCode.UnprocessableEntity },
        { "Feb 30", "application/json", Row("\"time\":\"2025-02-30T10:00:00Z\",\"value\":1"), HttpStatusCode.UnprocessableEntity },
        { "hour 25", "application/json", Row("\"time\":\"2025-05-31T25:00:00Z\",\"value\":1"), HttpStatusCode.UnprocessableEntity },
        { "offset +25:00", "application/json", Row("\"time\":\"2025-05-31T10:00:00+25:00\",\"value\":1"), HttpStatusCode.UnprocessableEntity },
        { "year 0001", "application/json", Row("\"time\":\"0001-01-01T00:00:00Z\",\"value\":1"), HttpStatusCode.UnprocessableEntity },
        { "a second before 1800", "application/json", Row("\"time\":\"1799-12-31T23:59:59Z\",\"value\":1"), HttpStatusCode.UnprocessableEntity },
        { "year 0001 with an offset", "application/json", Row("\"time\":\"0001-01-01T10:00:00+01:00\",\"value\":1"), HttpStatusCode.UnprocessableEntity },
        { "year 0001 in CSV", "text/csv", "time,value\r\n0001-01-01T00:00:00Z,1\r\n", HttpStatusCode.UnprocessableEntity },
        { "naive time", "application/json", Row("\"time\":\"2025-05-31T10:00:00\",\"value\":1"), HttpStatusCode.UnprocessableEntity },
        { "unknown unit", "application/json", Row($"\"time\":\"{T}\",\"value\":1,\"unit\":\"R\""), HttpStatusCode.UnprocessableEntity },
        { "unknown body unit", "application/json", "{\"unit\":\"X\",\"readings\":[{\"time\":\"" + T + "\",\"value\":1}]}", HttpStatusCode.BadRequest },
        { "below absolute zero in K", "application/json", Row($"\"time\":\"{T}\",\"value\":-3,\"unit\":\"K\""), HttpStatusCode.UnprocessableEntity },
        { "duplicate top-level keys", "application/json", "{\"readings\":[],\"readings\":[{\"time\":\"" + T + "\",\"value\":1}]}", HttpStatusCode.BadRequest },
        { "duplicate row keys", "application/json", Row($"\"time\":\"{T}\",\"value\":1,\"value\":99"), HttpStatusCode.BadRequest },
        { "deeply nested arrays", "application/json", "{\"readings\":" + new string('[', 5000) + new string(']', 5000) + "}", HttpStatusCode.BadRequest },
        { "JSON comment", "application/json", "{/* c */\"readings\":[{\"time\":\"" + T + "\",\"value\":1}]}", HttpStatusCode.BadRequest },
        { "BOM inside a CSV field", "text/csv", "time,value\r\n\uFEFF" + T + ",1\r\n", HttpStatusCode.UnprocessableEntity },
        { "CSV without header", "text/csv", T + ",1\r\n", HttpStatusCode.BadRequest },
        { "semicolon-separated CSV", "text/csv", "time;value\r\n" + T + ";1,5\r\n", HttpStatusCode.BadRequest },
        { "formula-looking value", "text/csv", "time,value\r\n" + T + ",=1+2\r\n", HttpStatusCode.UnprocessableEntity },
        { "formula-looking time", "text/csv", "time,value\r\n@SUM(A1),1\r\n", HttpStatusCode.UnprocessableEntity },
        { "unclosed quote", "text/csv", "time,value\r\n\"" + T + ",1\r\n", HttpStatusCode.UnprocessableEntity },
        { "NaN in CSV", "text/csv", "time,value\r\n" + T + ",NaN\r\n", HttpStatusCode.UnprocessableEntity },
        { "Infinity in CSV", "text/csv", "time,value\r\n" + T + ",Infinity\r\n", HttpStatusCode.UnprocessableEntity },
        { "1e400 in CSV", "text/csv", "time,value\r\n" + T + ",1e400\r\n", HttpStatusCode.UnprocessableEntity },
        { "thousands separator", "text/csv", "time,value\r\n" + T + ",\"1,000\"\r\n", HttpStatusCode.UnprocessableEntity },
        { "unsupported media type", "application/xml", "<readings/>", HttpStatusCode.UnsupportedMediaType },
    };

    private static string Row(string fields) => "{\"readings\":[{" + fields + "}]}";

    [Theory]
    [MemberData(nameof(Bodies))]
    public async Task HostileBodyGetsAProblemAndChangesNothing(string name, string contentType, string body, HttpStatusCode status)
    {
        await using var factory = new ApiFactory();
        using var client = await SiteWithThreeReadings(factory);
        var before = await Snapshot(client);

        using var response = await client.PostAsync(Some.Observations(),
            new StringContent(body, new UTF8Encoding(false), contentType));

        Assert.True(status == response.StatusCode, $"{name}: {response.StatusCode}");
        await ProblemAssert.IsProblem(response, status);
        await AssertUnchangedAndAnswering(client, before);
    }

    [Fact]
    public async Task BinaryGarbageGetsAProblemAndChangesNothing()
    {
        await using var factory = new ApiFactory();
        using var client = await SiteWithThreeReadings(factory);
        var before = await Snapshot(client);
        var garbage = new byte[4096];
        new Random(7).NextBytes(garbage);

        foreach (var type in new[] { "text/csv", "application/json" })
        {
            using var content = new ByteArrayContent(garbage);
            content.Headers.ContentType = new(type);
            using var response = await client.PostAsync(Some.Observations(), content);
            await ProblemAssert.IsProblem(response, HttpStatusCode.BadRequest);
        }
        await AssertUnchangedAndAnswering(client, before);
    }

    [Fact]
    public async Task OversizeBodiesAreRefusedWith413()
    {
        await using var factory = new ApiFactory();
        using var client = await SiteWithThreeReadings(factory);
        var before = await Snapshot(client);
        var start = ApiFactory.Now.AddDays(-30);
        var tooMany = Some.ReadingsBody(Enumerable.Range(0, 50_001).Select(i => (start.AddSeconds(30 * i), 1.0)));
        var tooManyCsv = Some.Csv(Enumerable.Range(0, 50_001).Select(i => (start.AddSeconds(30 * i), 1.0)));
        var tooBig = "{\"readings\":[],\"pad\":\"" + new string('x', (8 * 1024 * 1024) + 10) + "\"}";

        using var many = await client.PostAsync(Some.Observations(), System.Net.Http.Json.JsonContent.Create(tooMany));
        using var manyCsv = await client.PostRaw(tooManyCsv, "text/csv");
        using var big = await client.PostRaw(tooBig, "application/json");

        await ProblemAssert.IsProblem(many, HttpStatusCode.RequestEntityTooLarge);
        await ProblemAssert.IsProblem(manyCsv, HttpStatusCode.RequestEntityTooLarge);
        await ProblemAssert.IsProblem(big, HttpStatusCode.RequestEntityTooLarge);
        await AssertUnchangedAndAnswering(client, before);
    }

    [Theory]
    [InlineData("..%2F..%2Fetc%2Fpasswd")]
    [InlineData("%2E%2E")]
    [InlineData("ORCHARD-1")]
    [InlineData("aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa")]
    public async Task PathTraversalAndOverlongSiteIdsAreNotFound(string siteId)
    {
        await using var factory = new ApiFactory();
        using var client = await SiteWithThreeReadings(factory);
        var before = await Snapshot(client);

        using var post = await client.PostAsync(new Uri($"/api/v1/sites/{siteId}/observations", UriKind.Relative),
            new StringContent(Row($"\"time\":\"{T}\",\"value\":1"), Encoding.UTF8, "application/json"));
        using var get = await client.GetAsync(new Uri($"/api/v1/sites/{siteId}", UriKind.Relative));
        using var delete = await client.DeleteAsync(new Uri($"/api/v1/sites/{siteId}", UriKind.Relative));

        Assert.Equal(HttpStatusCode.NotFound, post.StatusCode);
        await ProblemAssert.IsProblem(post, HttpStatusCode.NotFound);
        await ProblemAssert.IsProblem(get, HttpStatusCode.NotFound);
        await ProblemAssert.IsProblem(delete, HttpStatusCode.NotFound);
        await AssertUnchangedAndAnswering(client, before);
    }

    [Fact]
    public async Task HostileSiteBodiesAreProblemsAndCreateNothing()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        var bodies = new[]
        {
            "{\"id\":\"a\",\"id\":\"b\",\"name\":\"x\",\"timeZone\":\"UTC\",\"cadence\":\"hourly\"}",
            "{\"id\":\"a\",\"name\":\"x\",\"timeZone\":\"UTC\",\"cadence\":\"hourly\",\"latitude\":1e400}",
            "{\"id\":\"a\",\"name\":\"x\",\"timeZone\":\"UTC\",\"cadence\":\"hourly\",\"quality\":[[[[[[[[[[[[[[[[[[[[]]]]]]]]]]]]]]]]]]]}",
            "{\"id\":\"" + new string('a', 64) + "\",\"name\":\"x\",\"timeZone\":\"UTC\",\"cadence\":\"hourly\"}",
            "{\"id\":\"a\",\"name\":\"\\u0000\",\"timeZone\":\"UTC\",\"cadence\":\"hourly\"}",
            "\"just a string\"",
            "{\"id\":\"a\"",
        };

        foreach (var body in bodies)
        {
            using var response = await client.PostAsync(new Uri("/api/v1/sites", UriKind.Relative),
                new StringContent(body, Encoding.UTF8, "application/json"));
            Assert.True(response.StatusCode == HttpStatusCode.BadRequest, body);
            await ProblemAssert.IsProblem(response, HttpStatusCode.BadRequest);
        }
        var list = await System.Net.Http.Json.HttpClientJsonExtensions.GetFromJsonAsync<System.Text.Json.JsonElement>(client,
            new Uri("/api/v1/sites", UriKind.Relative));
        Assert.Equal(0, list.GetProperty("sites").GetArrayLength());
    }

    private static async Task<HttpClient> SiteWithThreeReadings(ApiFactory factory)
    {
        var client = factory.CreateAdminClient();
        (await client.CreateSite()).Dispose();
        using var posted = await client.PostReadings(Some.HourlyReadings(3, ApiFactory.Now.AddDays(-1)));
        Assert.Equal(HttpStatusCode.OK, posted.StatusCode);
        return client;
    }

    private static async Task<List<string>> Snapshot(HttpClient client) =>
        (await client.AllReadings()).Select(r => r.GetRawText()).ToList();

    private static async Task AssertUnchangedAndAnswering(HttpClient client, List<string> before)
    {
        Assert.Equal(before, await Snapshot(client));
        using var live = await client.GetAsync(new Uri("/health/live", UriKind.Relative));
        Assert.Equal(HttpStatusCode.OK, live.StatusCode);
    }
}
