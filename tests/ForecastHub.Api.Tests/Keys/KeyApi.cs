using System.Net;
using System.Net.Http.Headers;
using System.Net.Http.Json;
using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;

namespace ForecastHub.Api.Tests.Keys;

/// <summary>A key as the create call answered it, secret included.</summary>
public sealed record IssuedKey(string Id, string Secret, string Scope, IReadOnlyList<string> SiteIds);

/// <summary>Test-data factories for keys, through the real endpoints.</summary>
public static class KeyApi
{
    public static readonly Uri Keys = new("/api/v1/keys", UriKind.Relative);

    public static Uri Key(string id) => new($"/api/v1/keys/{id}", UriKind.Relative);

    /// <summary>Issues a key; the sites it names are created first when missing (ingest keys are for existing sites only).</summary>
    public static async Task<IssuedKey> IssueKey(this HttpClient admin, string scope, params string[] siteIds)
    {
        ArgumentNullException.ThrowIfNull(admin);
        foreach (var siteId in siteIds)
        {
            using var site = await admin.CreateSite(Some.Site(siteId));
            Assert.True(site.StatusCode is HttpStatusCode.Created or HttpStatusCode.Conflict, $"creating site {siteId} answered {site.StatusCode}");
        }
        using var response = await admin.PostAsJsonAsync(Keys, new { scope, siteIds, label = $"test {scope}" });
        var text = await response.Content.ReadAsStringAsync();
        Assert.True(response.StatusCode == HttpStatusCode.Created, $"creating a {scope} key answered {response.StatusCode}: {text}");
        var body = JsonDocument.Parse(text).RootElement;
        return new IssuedKey(
            body.GetProperty("id").GetString()!,
            body.GetProperty("key").GetString()!,
            body.GetProperty("scope").GetString()!,
            body.GetProperty("siteIds").EnumerateArray().Select(s => s.GetString()!).ToList());
    }

    public static async Task Revoke(this HttpClient admin, string keyId)
    {
        ArgumentNullException.ThrowIfNull(admin);
        using var response = await admin.DeleteAsync(Key(keyId));
        Assert.Equal(HttpStatusCode.NoContent, response.StatusCode);
    }

    /// <summary>A request carrying <paramref name="secret"/> as its Bearer key.</summary>
    public static HttpRequestMessage With(this HttpRequestMessage request, string? secret)
    {
        ArgumentNullException.ThrowIfNull(request);
        if (secret is not null)
        {
            request.Headers.Authorization = new AuthenticationHeaderValue("Bearer", secret);
        }
        return request;
    }

    public static Task<HttpResponseMessage> GetWith(this HttpClient client, string path, string? secret)
    {
        ArgumentNullException.ThrowIfNull(client);
        return client.SendAsync(new HttpRequestMessage(HttpMethod.Get, new Uri(path, UriKind.Relative)).With(secret));
    }
}
