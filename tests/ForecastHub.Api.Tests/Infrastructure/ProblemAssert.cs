using System.Net;
using System.Text.Json;

namespace ForecastHub.Api.Tests.Infrastructure;

public static class ProblemAssert
{
    /// <summary>The answer is an RFC 9457 problem with this status; answers its JSON.</summary>
    public static async Task<JsonElement> IsProblem(HttpResponseMessage response, HttpStatusCode status)
    {
        ArgumentNullException.ThrowIfNull(response);
        var text = await response.Content.ReadAsStringAsync();
        Assert.True(status == response.StatusCode, $"expected {status}, got {response.StatusCode}: {text}");
        Assert.Equal("application/problem+json", response.Content.Headers.ContentType?.MediaType);
        using var document = JsonDocument.Parse(text);
        var problem = document.RootElement.Clone();
        Assert.Equal((int)status, problem.GetProperty("status").GetInt32());
        Assert.DoesNotContain("   at ", text, StringComparison.Ordinal);
        return problem;
    }

    /// <summary>The problem's text names <paramref name="field"/>.</summary>
    public static async Task NamesField(HttpResponseMessage response, HttpStatusCode status, string field)
    {
        var problem = await IsProblem(response, status);
        Assert.Contains(field, problem.GetRawText(), StringComparison.Ordinal);
    }
}
