using System.Net;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;

namespace ForecastHub.Api.Tests.Verification;

/// <summary>No answer carries NaN or Infinity: a score that is not a finite number is null with a note.</summary>
public sealed class NonFiniteScoreTests
{
    [Fact]
    public async Task SeriesThatRepeatsEveryDayGetsNullSkillWithANoteInsteadOfAServerError()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateHourlySiteAsync("repeats");
        // The same 24 values every day: yesterday's value is a perfect forecast, so skill against it divides by zero.
        var end = factory.Clock.GetUtcNow();
        var start = end.AddHours(-30 * 24);
        await factory.IngestAsync("repeats", Enumerable.Range(0, 30 * 24)
            .Select(i => (start.AddHours(i), Math.Round(12 + 5 * Math.Sin(2 * Math.PI * (i % 24) / 24), 2))));
        await client.RefitAsync("repeats");

        using var response = await client.GetAsync(new Uri("/api/v1/sites/repeats/verification", UriKind.Relative));
        var text = await response.Content.ReadAsStringAsync();

        Assert.True(response.StatusCode == HttpStatusCode.OK, $"answered {(int)response.StatusCode}: {text}");
        Assert.DoesNotContain("NaN", text, StringComparison.Ordinal);
        Assert.DoesNotContain("Infinity", text, StringComparison.Ordinal);
        var pooled = System.Text.Json.JsonDocument.Parse(text).RootElement.GetProperty("backtest").GetProperty("pooled");
        Assert.Equal(System.Text.Json.JsonValueKind.Null, pooled.GetProperty("skillVsPersistence").ValueKind);
        Assert.Contains(pooled.GetProperty("notes").EnumerateArray(), n => n.GetString()!.Contains("skillVsPersistence", StringComparison.Ordinal));
    }
}
