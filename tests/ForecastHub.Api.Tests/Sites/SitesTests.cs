using System.Net;
using System.Net.Http.Json;
using System.Text;
using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;

namespace ForecastHub.Api.Tests.Sites;

public sealed class SitesTests
{
    private static Uri Site(string id) => new($"/api/v1/sites/{id}", UriKind.Relative);

    [Fact]
    public async Task CreatedSiteAnswers201WithLocationAndTheDefaultSettings()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();

        using var response = await client.CreateSite();

        Assert.Equal(HttpStatusCode.Created, response.StatusCode);
        Assert.Equal("/api/v1/sites/orchard-1", response.Headers.Location?.OriginalString);
        var site = await response.Content.ReadFromJsonAsync<JsonElement>();
        Assert.Equal("Europe/Berlin", site.GetProperty("timeZone").GetString());
        var model = site.GetProperty("model");
        Assert.Equal("auto", model.GetProperty("seasonality").GetString());
        Assert.Equal("burg", model.GetProperty("method").GetString());
        Assert.Equal("pacf-aic", model.GetProperty("orderPolicy").GetString());
        Assert.Equal(48, model.GetProperty("maxOrder").GetInt32());
        Assert.Equal(400, model.GetProperty("fitWindowDays").GetInt32());
        Assert.Equal("calibrated", model.GetProperty("intervalMethod").GetString());
        var quality = site.GetProperty("quality");
        Assert.Equal(-60, quality.GetProperty("minC").GetDouble());
        Assert.Equal(60, quality.GetProperty("maxC").GetDouble());
        Assert.Equal(10, quality.GetProperty("maxStepCPerHour").GetDouble());
        Assert.Equal(6, quality.GetProperty("flatlineHours").GetDouble());
    }

    [Fact]
    public async Task DailySiteDefaultsToMeanStatisticAndFourYearWindow()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();

        using var response = await client.CreateSite(Some.Site("vineyard", cadence: "daily"));

        var site = await response.Content.ReadFromJsonAsync<JsonElement>();
        Assert.Equal("mean", site.GetProperty("dailyStatistic").GetString());
        Assert.Equal(1461, site.GetProperty("model").GetProperty("fitWindowDays").GetInt32());
    }

    [Fact]
    public async Task CreatingWithoutAKeyIsRefusedWithAProblem()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateClient();

        using var response = await client.CreateSite();

        await ProblemAssert.IsProblem(response, HttpStatusCode.Unauthorized);
        Assert.Equal("Bearer", response.Headers.WwwAuthenticate.Single().Scheme);
    }

    [Fact]
    public async Task AWrongKeyIsRefusedAndNothingIsStored()
    {
        await using var factory = new ApiFactory();
        using var wrong = factory.CreateClient();
        wrong.DefaultRequestHeaders.Authorization = new("Bearer", ApiFactory.AdminKey + "x");
        using var admin = factory.CreateAdminClient();

        using var response = await wrong.CreateSite();

        await ProblemAssert.IsProblem(response, HttpStatusCode.Unauthorized);
        using var read = await admin.GetAsync(Site("orchard-1"));
        Assert.Equal(HttpStatusCode.NotFound, read.StatusCode);
    }

    [Fact]
    public async Task ReadsNeedAKeyUnlessAnonymousReadsAreOn()
    {
        await using var closed = new ApiFactory();
        await using var open = new ApiFactory { AllowAnonymousRead = true };

        using var refused = await closed.CreateClient().GetAsync(new Uri("/api/v1/sites", UriKind.Relative));
        using var allowed = await open.CreateClient().GetAsync(new Uri("/api/v1/sites", UriKind.Relative));

        await ProblemAssert.IsProblem(refused, HttpStatusCode.Unauthorized);
        Assert.Equal(HttpStatusCode.OK, allowed.StatusCode);
    }

    [Theory]
    [InlineData("{\"id\":\"Bad_Id\",\"name\":\"x\",\"timeZone\":\"UTC\",\"cadence\":\"hourly\"}", "id")]
    [InlineData("{\"id\":\"a\",\"name\":\"x\",\"timeZone\":\"Mars/Olympus\",\"cadence\":\"hourly\"}", "timeZone")]
    [InlineData("{\"id\":\"a\",\"name\":\"x\",\"timeZone\":\"../../etc/passwd\",\"cadence\":\"hourly\"}", "timeZone")]
    [InlineData("{\"id\":\"a\",\"name\":\"x\",\"timeZone\":\"UTC\",\"cadence\":\"weekly\"}", "cadence")]
    [InlineData("{\"id\":\"a\",\"name\":\"x\",\"timeZone\":\"UTC\",\"cadence\":\"hourly\",\"dailyStatistic\":\"max\"}", "dailyStatistic")]
    [InlineData("{\"id\":\"a\",\"name\":\"x\",\"timeZone\":\"UTC\",\"cadence\":\"hourly\",\"latitude\":91}", "latitude")]
    [InlineData("{\"id\":\"a\",\"name\":\"x\",\"timeZone\":\"UTC\",\"cadence\":\"hourly\",\"latitude\":\"north\"}", "latitude")]
    [InlineData("{\"id\":\"a\",\"name\":\"x\",\"timeZone\":\"UTC\",\"cadence\":\"hourly\",\"quality\":{\"minC\":10,\"maxC\":5}}", "quality.maxC")]
    [InlineData("{\"id\":\"a\",\"name\":\"x\",\"timeZone\":\"UTC\",\"cadence\":\"hourly\",\"model\":{\"method\":\"magic\"}}", "model.method")]
    [InlineData("{\"id\":\"a\",\"name\":\"x\",\"timeZone\":\"UTC\",\"cadence\":\"hourly\",\"model\":{\"maxOrder\":0}}", "model.maxOrder")]
    [InlineData("{\"id\":\"a\",\"name\":\"x\",\"timeZone\":\"UTC\",\"cadence\":\"hourly\",\"model\":{\"fitWindowDays\":2.5}}", "model.fitWindowDays")]
    [InlineData("{\"id\":\"a\",\"name\":\"x\",\"timeZone\":\"UTC\",\"cadence\":\"hourly\",\"colour\":\"red\"}", "colour")]
    [InlineData("{\"id\":\"a\",\"name\":\"x\",\"timeZone\":\"UTC\"}", "cadence")]
    public async Task InvalidSiteIsRefusedNamingTheField(string body, string field)
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();

        using var response = await client.PostAsync(new Uri("/api/v1/sites", UriKind.Relative),
            new StringContent(body, Encoding.UTF8, "application/json"));

        await ProblemAssert.NamesField(response, HttpStatusCode.BadRequest, field);
        var list = await client.GetFromJsonAsync<JsonElement>(new Uri("/api/v1/sites", UriKind.Relative));
        Assert.Equal(0, list.GetProperty("sites").GetArrayLength());
    }

    [Fact]
    public async Task ASecondSiteWithTheSameIdIsAConflict()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        (await client.CreateSite()).Dispose();

        using var response = await client.CreateSite(Some.Site());

        await ProblemAssert.IsProblem(response, HttpStatusCode.Conflict);
    }

    [Fact]
    public async Task PatchChangesSettingsAndRaisesTheSettingsVersion()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        (await client.CreateSite()).Dispose();

        using var response = await client.PatchAsJsonAsync(Site("orchard-1"),
            new { model = new { method = "yule-walker", maxOrder = 12 }, quality = new { minC = -30.0 } });

        var site = await response.Content.ReadFromJsonAsync<JsonElement>();
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("yule-walker", site.GetProperty("model").GetProperty("method").GetString());
        Assert.Equal(12, site.GetProperty("model").GetProperty("maxOrder").GetInt32());
        Assert.Equal("pacf-aic", site.GetProperty("model").GetProperty("orderPolicy").GetString());
        Assert.Equal(-30, site.GetProperty("quality").GetProperty("minC").GetDouble());
        Assert.Equal(2, site.GetProperty("settingsVersion").GetInt64());
        var reread = await client.GetFromJsonAsync<JsonElement>(Site("orchard-1"));
        Assert.Equal(2, reread.GetProperty("settingsVersion").GetInt64());
    }

    [Fact]
    public async Task RenamingASiteKeepsItsSettingsVersion()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        (await client.CreateSite()).Dispose();
        factory.Clock.Advance(TimeSpan.FromHours(1));

        using var response = await client.PatchAsJsonAsync(Site("orchard-1"), new { name = "North orchard" });

        var site = await response.Content.ReadFromJsonAsync<JsonElement>();
        Assert.Equal("North orchard", site.GetProperty("name").GetString());
        Assert.Equal(1, site.GetProperty("settingsVersion").GetInt64());
        Assert.Equal(ApiFactory.Now.AddHours(1), site.GetProperty("updatedAt").GetDateTimeOffset());
    }

    [Fact]
    public async Task PatchWithNullClearsTheCoordinatesAndAnInvalidPatchChangesNothing()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        (await client.CreateSite()).Dispose();

        using var bad = await client.PatchAsJsonAsync(Site("orchard-1"), new { name = "x", cadence = "monthly" });
        using var good = await client.PatchAsync(Site("orchard-1"),
            new StringContent("{\"latitude\":null,\"longitude\":null}", Encoding.UTF8, "application/json"));

        await ProblemAssert.NamesField(bad, HttpStatusCode.BadRequest, "cadence");
        var site = await good.Content.ReadFromJsonAsync<JsonElement>();
        Assert.Equal("Site orchard-1", site.GetProperty("name").GetString());
        Assert.Equal(JsonValueKind.Null, site.GetProperty("latitude").ValueKind);
        Assert.Equal(JsonValueKind.Null, site.GetProperty("longitude").ValueKind);
    }

    [Fact]
    public async Task DeletedSiteIsGoneAndASecondDeleteIsNotFound()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        (await client.CreateSite()).Dispose();

        using var first = await client.DeleteAsync(Site("orchard-1"));
        using var second = await client.DeleteAsync(Site("orchard-1"));
        using var read = await client.GetAsync(Site("orchard-1"));

        Assert.Equal(HttpStatusCode.NoContent, first.StatusCode);
        await ProblemAssert.IsProblem(second, HttpStatusCode.NotFound);
        await ProblemAssert.IsProblem(read, HttpStatusCode.NotFound);
    }

    [Fact]
    public async Task ListingFollowsNextLinksToTheEnd()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        var ids = Enumerable.Range(0, 7).Select(i => $"site-{i}").ToList();
        foreach (var id in ids)
        {
            (await client.CreateSite(Some.Site(id))).Dispose();
        }

        var seen = new List<string>();
        string? next = "/api/v1/sites?limit=3";
        var pages = 0;
        while (next is not null)
        {
            var page = await client.GetFromJsonAsync<JsonElement>(new Uri(next, UriKind.Relative));
            seen.AddRange(page.GetProperty("sites").EnumerateArray().Select(s => s.GetProperty("id").GetString()!));
            next = page.GetProperty("next").GetString();
            pages++;
        }

        Assert.Equal(ids, seen);
        Assert.Equal(3, pages);
    }
}
