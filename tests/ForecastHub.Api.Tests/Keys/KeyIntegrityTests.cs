using System.Net;
using System.Net.Http.Json;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Tests.Infrastructure;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Keys;

/// <summary>What a key may learn and undo: stored values stay hidden from keys without read scope,
/// ingest keys name existing sites only, and revocation is neither repeated nor self-locking.</summary>
public sealed class KeyIntegrityTests
{
    private static readonly DateTimeOffset Time = new(2025, 5, 1, 0, 0, 0, TimeSpan.Zero);

    [Fact]
    public async Task ConflictReasonShowsTheStoredValueOnlyToKeysThatMayReadIt()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();
        var ingest = await admin.IssueKey("ingest", "orchard-1");
        using (var first = await admin.PostReadings([(Time, 10.0)]))
        {
            Assert.Equal(HttpStatusCode.OK, first.StatusCode);
        }

        using var client = factory.CreateClient();
        using var byIngest = await client.SendAsync(new HttpRequestMessage(HttpMethod.Post, Some.Observations())
        {
            Content = JsonContent.Create(Some.ReadingsBody([(Time, 11.0)])),
        }.With(ingest.Secret));
        using var byAdmin = await admin.PostReadings([(Time, 11.0)]);

        var hidden = (await ProblemAssert.IsProblem(byIngest, HttpStatusCode.UnprocessableEntity)).GetProperty("rejected")[0].GetProperty("reason").GetString()!;
        var shown = (await ProblemAssert.IsProblem(byAdmin, HttpStatusCode.UnprocessableEntity)).GetProperty("rejected")[0].GetProperty("reason").GetString()!;
        Assert.DoesNotContain("10", hidden, StringComparison.Ordinal);
        Assert.Contains("a different value is already stored", hidden, StringComparison.Ordinal);
        Assert.Contains("10 C is already stored", shown, StringComparison.Ordinal);
    }

    [Fact]
    public async Task IngestKeyForASiteThatDoesNotExistIsRefused()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();

        using var response = await admin.PostAsJsonAsync(KeyApi.Keys, new { scope = "ingest", siteIds = new[] { "no-such-site" } });
        var list = await admin.GetStringAsync(KeyApi.Keys);

        await ProblemAssert.NamesField(response, HttpStatusCode.BadRequest, "no-such-site");
        Assert.Contains("\"keys\":[]", list, StringComparison.Ordinal);
    }

    [Fact]
    public async Task RevokingAnAlreadyRevokedKeyIsAConflictAndKeepsTheFirstRevocationTime()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();
        var key = await admin.IssueKey("read");
        await admin.Revoke(key.Id);
        factory.Clock.Advance(TimeSpan.FromHours(1));

        using var again = await admin.DeleteAsync(KeyApi.Key(key.Id));
        var stored = await admin.GetFromJsonAsync<System.Text.Json.JsonElement>(KeyApi.Key(key.Id));

        await ProblemAssert.IsProblem(again, HttpStatusCode.Conflict);
        Assert.Equal(ApiFactory.Now, stored.GetProperty("revokedAt").GetDateTimeOffset());
    }

    [Fact]
    public async Task TheLastAdminKeyCannotRevokeItselfButCanOnceAnotherExists()
    {
        using var output = new StringWriter();
        await using var factory = new ApiFactory
        {
            Settings = new Dictionary<string, string?> { ["Auth:AdminKey"] = "" },
            TestServices = s => s.AddSingleton(new FirstAdminKeyOutput(output)),
        };
        using var client = factory.CreateClient();
        var secret = output.ToString().Split('\n', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries)[^1];
        client.DefaultRequestHeaders.Authorization = new System.Net.Http.Headers.AuthenticationHeaderValue("Bearer", secret);
        var own = (await client.GetFromJsonAsync<System.Text.Json.JsonElement>(KeyApi.Keys)).GetProperty("keys")[0].GetProperty("id").GetString()!;

        using var refused = await client.DeleteAsync(KeyApi.Key(own));
        using var stillWorks = await client.GetAsync(KeyApi.Keys);
        var other = await client.IssueKey("admin");
        using var allowed = await client.DeleteAsync(KeyApi.Key(own));
        using var otherWorks = await client.SendAsync(new HttpRequestMessage(HttpMethod.Get, KeyApi.Keys).With(other.Secret));

        await ProblemAssert.IsProblem(refused, HttpStatusCode.Conflict);
        Assert.Equal(HttpStatusCode.OK, stillWorks.StatusCode);
        Assert.Equal(HttpStatusCode.NoContent, allowed.StatusCode);
        Assert.Equal(HttpStatusCode.OK, otherWorks.StatusCode);
    }
}
