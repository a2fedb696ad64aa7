using System.Net.Http.Json;
using System.Text;
using System.Text.Json;

namespace ForecastHub.Api.Tests.Infrastructure;

/// <summary>Posting and reading observations of one site.</summary>
public static class ObservationClient
{
    public static Task<HttpResponseMessage> PostReadings(this HttpClient client, IEnumerable<(DateTimeOffset Time, double Value)> readings,
        string siteId = "orchard-1", string query = "", string? unit = null) =>
        client.PostAsJsonAsync(Some.Observations(siteId, query), Some.ReadingsBody(readings, unit));

    public static Task<HttpResponseMessage> PostRaw(this HttpClient client, string body, string contentType,
        string siteId = "orchard-1", string query = "") =>
        client.PostAsync(Some.Observations(siteId, query), new StringContent(body, Encoding.UTF8, contentType));

    public static async Task<JsonElement> Json(this HttpResponseMessage response)
    {
        ArgumentNullException.ThrowIfNull(response);
        return await response.Content.ReadFromJsonAsync<JsonElement>();
    }

    /// <summary>Every stored reading of the site, following next links to the end.</summary>
    public static async Task<List<JsonElement>> AllReadings(this HttpClient client, string siteId = "orchard-1", int limit = 10_000)
    {
        var all = new List<JsonElement>();
        string? next = $"/api/v1/sites/{siteId}/observations?limit={limit}";
        while (next is not null)
        {
            var page = await client.GetFromJsonAsync<JsonElement>(new Uri(next, UriKind.Relative));
            all.AddRange(page.GetProperty("readings").EnumerateArray());
            next = page.GetProperty("next").GetString();
        }
        return all;
    }

    public static int Count(this JsonElement answer, string name) => answer.GetProperty(name).GetInt32();
}
