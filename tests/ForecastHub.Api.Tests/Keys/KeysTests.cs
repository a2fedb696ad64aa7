using System.Net;
using System.Net.Http.Json;
using System.Text;
using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;

namespace ForecastHub.Api.Tests.Keys;

public sealed class KeysTests
{
    private const string SitesPath = "/api/v1/sites";

    [Fact]
    public async Task CreatedKeyIsShownOnceAndWorksAtOnce()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();
        using var client = factory.CreateClient();

        using var created = await admin.PostAsJsonAsync(KeyApi.Keys, new { scope = "read", label = "wall screen" });
        var body = await created.Content.ReadFromJsonAsync<JsonElement>();
        var id = body.GetProperty("id").GetString()!;
        using var listed = await admin.GetAsync(KeyApi.Keys);
        var listText = await listed.Content.ReadAsStringAsync();
        using var read = await client.GetWith(SitesPath, body.GetProperty("key").GetString());

        Assert.Equal(HttpStatusCode.Created, created.StatusCode);
        Assert.Equal($"/api/v1/keys/{id}", created.Headers.Location?.OriginalString);
        Assert.True(created.Headers.CacheControl?.NoStore, "the answer holding a secret must not be cached");
        Assert.Equal("read", body.GetProperty("scope").GetString());
        Assert.Equal("wall screen", body.GetProperty("label").GetString());
        Assert.Contains(id, listText, StringComparison.Ordinal);
        Assert.DoesNotContain(body.GetProperty("key").GetString()!, listText, StringComparison.Ordinal);
        Assert.DoesNotContain("\"key\"", listText, StringComparison.Ordinal);
        Assert.Equal(HttpStatusCode.OK, read.StatusCode);
    }

    [Fact]
    public async Task SecretCarries256RandomBitsBehindAFixedPrefix()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();

        var first = await admin.IssueKey("read");
        var second = await admin.IssueKey("read");

        Assert.StartsWith("fhk_", first.Secret, StringComparison.Ordinal);
        var random = first.Secret["fhk_".Length..].Replace('-', '+').Replace('_', '/') + "=";
        Assert.Equal(32, Convert.FromBase64String(random).Length);
        Assert.NotEqual(first.Secret, second.Secret);
        Assert.Matches("^key-[0-9a-f]{16}$", first.Id);
    }

    [Fact]
    public async Task RevokedKeyIsRefusedOnTheVeryNextRequest()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();
        using var client = factory.CreateClient();
        var key = await admin.IssueKey("read");
        using var before = await client.GetWith(SitesPath, key.Secret);

        await admin.Revoke(key.Id);
        using var after = await client.GetWith(SitesPath, key.Secret);

        Assert.Equal(HttpStatusCode.OK, before.StatusCode);
        await ProblemAssert.IsProblem(after, HttpStatusCode.Unauthorized);
    }

    [Fact]
    public async Task CachedKeyExpiresFromTheCacheButStillWorks()
    {
        await using var factory = new ApiFactory { Settings = new Dictionary<string, string?> { ["Auth:KeyCacheSeconds"] = "5" } };
        using var admin = factory.CreateAdminClient();
        using var client = factory.CreateClient();
        var key = await admin.IssueKey("read");
        using var first = await client.GetWith(SitesPath, key.Secret);

        factory.Clock.Advance(TimeSpan.FromSeconds(6));
        using var second = await client.GetWith(SitesPath, key.Secret);

        Assert.Equal(HttpStatusCode.OK, first.StatusCode);
        Assert.Equal(HttpStatusCode.OK, second.StatusCode);
    }

    [Fact]
    public async Task RevokedKeyStaysListedWithItsRevocationTime()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();
        var key = await admin.IssueKey("ingest", "orchard-1");

        await admin.Revoke(key.Id);
        var stored = await admin.GetFromJsonAsync<JsonElement>(KeyApi.Key(key.Id));

        Assert.Equal(ApiFactory.Now, stored.GetProperty("revokedAt").GetDateTimeOffset());
        Assert.Equal(["orchard-1"], stored.GetProperty("siteIds").EnumerateArray().Select(s => s.GetString()));
        Assert.False(stored.TryGetProperty("key", out _));
    }

    [Fact]
    public async Task RevokingAnUnknownKeyAnswersNotFound()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();

        using var unknown = await admin.DeleteAsync(KeyApi.Key("key-0000000000000000"));
        using var malformed = await admin.DeleteAsync(KeyApi.Key("..%2F..%2Fetc"));

        await ProblemAssert.IsProblem(unknown, HttpStatusCode.NotFound);
        await ProblemAssert.IsProblem(malformed, HttpStatusCode.NotFound);
    }

    [Fact]
    public async Task ConfiguredAdminKeyCannotBeRevokedThroughTheApi()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();

        using var response = await admin.DeleteAsync(KeyApi.Key("configured-admin"));

        var problem = await ProblemAssert.IsProblem(response, HttpStatusCode.Conflict);
        Assert.Contains("Auth:AdminKey", problem.GetProperty("detail").GetString(), StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("""{"scope":"owner"}""", "scope")]
    [InlineData("""{}""", "scope")]
    [InlineData("""{"scope":"read","siteIds":["orchard-1"]}""", "siteIds")]
    [InlineData("""{"scope":"ingest","siteIds":["Not A Slug"]}""", "siteIds")]
    [InlineData("""{"scope":"ingest","siteIds":[null]}""", "siteIds")]
    [InlineData("""{"scope":"ingest","siteIds":"orchard-1"}""", "siteIds")]
    [InlineData("""{"scope":"read","secret":"mine"}""", "secret")]
    [InlineData("""{"scope":"read","scope":"admin"}""", "body")]
    [InlineData("""[{"scope":"read"}]""", "body")]
    [InlineData("""{"scope":"read" """, "body")]
    public async Task BadKeyRequestIsAProblemNamingTheField(string json, string field)
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();

        using var response = await admin.PostAsync(KeyApi.Keys, new StringContent(json, Encoding.UTF8, "application/json"));
        var list = await admin.GetFromJsonAsync<JsonElement>(KeyApi.Keys);

        await ProblemAssert.NamesField(response, HttpStatusCode.BadRequest, field);
        Assert.Equal(0, list.GetProperty("keys").GetArrayLength());
    }

    [Fact]
    public async Task OverlongLabelIsRefused()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();

        using var response = await admin.PostAsJsonAsync(KeyApi.Keys, new { scope = "read", label = new string('x', 101) });

        await ProblemAssert.NamesField(response, HttpStatusCode.BadRequest, "label");
    }

    [Fact]
    public async Task KeyRequestMustBeJsonAndSmall()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();

        using var form = await admin.PostAsync(KeyApi.Keys, new StringContent("scope=read", Encoding.UTF8, "application/x-www-form-urlencoded"));
        using var huge = await admin.PostAsync(KeyApi.Keys, new StringContent(
            $$"""{"scope":"read","label":"{{new string('x', 5000)}}"}""", Encoding.UTF8, "application/json"));

        await ProblemAssert.IsProblem(form, HttpStatusCode.UnsupportedMediaType);
        await ProblemAssert.IsProblem(huge, HttpStatusCode.RequestEntityTooLarge);
    }

    [Fact]
    public async Task KeyListIsPagedToTheEnd()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();
        var issued = new[] { await admin.IssueKey("read"), await admin.IssueKey("read"), await admin.IssueKey("admin") };

        var seen = new List<string>();
        string? next = "/api/v1/keys?limit=2";
        while (next is not null)
        {
            var page = await admin.GetFromJsonAsync<JsonElement>(new Uri(next, UriKind.Relative));
            seen.AddRange(page.GetProperty("keys").EnumerateArray().Select(k => k.GetProperty("id").GetString()!));
            next = page.GetProperty("next").GetString();
        }

        Assert.Equal(issued.Select(k => k.Id).Order(StringComparer.Ordinal), seen);
    }

    [Fact]
    public async Task IngestKeyWithoutSitesMayPostToEverySite()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();
        using var client = factory.CreateClient();
        await admin.CreateSite(Some.Site("orchard-1"));
        await admin.CreateSite(Some.Site("orchard-2"));
        var key = await admin.IssueKey("ingest");
        var readings = Some.ReadingsBody(Some.HourlyReadings(3, ApiFactory.Now));

        foreach (var site in new[] { "orchard-1", "orchard-2" })
        {
            using var request = new HttpRequestMessage(HttpMethod.Post, Some.Observations(site)) { Content = JsonContent.Create(readings) };
            using var response = await client.SendAsync(request.With(key.Secret));

            Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        }
    }
}
