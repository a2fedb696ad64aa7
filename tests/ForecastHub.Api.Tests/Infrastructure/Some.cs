using System.Globalization;
using System.Net.Http.Json;
using System.Text;

namespace ForecastHub.Api.Tests.Infrastructure;

/// <summary>Test-data factories.</summary>
public static class Some
{
    public static object Site(string id = "orchard-1", string cadence = "hourly", object? quality = null, object? model = null) =>
        new { id, name = $"Site {id}", timeZone = "Europe/Berlin", cadence, latitude = 52.5, longitude = 13.4, quality, model };

    /// <summary>Hourly readings ending one hour before <paramref name="end"/>, a gentle daily cycle
    /// that no QC rule flags.</summary>
    public static IReadOnlyList<(DateTimeOffset Time, double Value)> HourlyReadings(int count, DateTimeOffset end, double level = 12)
    {
        var start = end.AddHours(-count);
        return Enumerable.Range(0, count)
            .Select(i => (start.AddHours(i), Math.Round(level + 5 * Math.Sin(2 * Math.PI * i / 24) + 0.01 * (i % 7), 2)))
            .ToList();
    }

    public static object ReadingsBody(IEnumerable<(DateTimeOffset Time, double Value)> readings, string? unit = null) =>
        new { unit, readings = readings.Select(r => new { time = Iso(r.Time), value = r.Value }).ToArray() };

    public static string Csv(IEnumerable<(DateTimeOffset Time, double Value)> readings, string newline = "\r\n")
    {
        var text = new StringBuilder("time,value").Append(newline);
        foreach (var (time, value) in readings)
        {
            text.Append(Iso(time)).Append(',').Append(value.ToString(CultureInfo.InvariantCulture)).Append(newline);
        }
        return text.ToString();
    }

    /// <summary>UTC with 'Z', the form the service answers with.</summary>
    public static string Iso(DateTimeOffset time) => time.UtcDateTime.ToString("yyyy-MM-dd'T'HH:mm:ss'Z'", CultureInfo.InvariantCulture);

    public static async Task<HttpResponseMessage> CreateSite(this HttpClient client, object? site = null) =>
        await client.PostAsJsonAsync(new Uri("/api/v1/sites", UriKind.Relative), site ?? Site());

    public static Uri Observations(string siteId = "orchard-1", string query = "") =>
        new($"/api/v1/sites/{siteId}/observations{query}", UriKind.Relative);
}
