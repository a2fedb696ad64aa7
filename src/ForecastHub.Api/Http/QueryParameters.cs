using ForecastHub.Api.Problems;
using Microsoft.AspNetCore.Http.HttpResults;

namespace ForecastHub.Api.Http;

/// <summary>Refuses query parameters a route does not read (names compared without case, as binding does), so a misspelt or unsupported option
/// (<c>unit=F</c> where no unit applies, <c>step=3</c> for <c>steps</c>) is a 400, not silently ignored.</summary>
public static class QueryParameters
{
    public static ProblemHttpResult? RejectUnknown(HttpRequest request, params string[] known)
    {
        ArgumentNullException.ThrowIfNull(request);
        var unknown = request.Query.Keys.Where(k => !known.Contains(k, StringComparer.OrdinalIgnoreCase)).Order(StringComparer.Ordinal).ToList();
        return unknown.Count == 0
            ? null
            : ApiProblems.BadRequest(unknown[0],
                $"Unknown query parameter{(unknown.Count > 1 ? "s" : "")} {string.Join(", ", unknown.Select(u => $"'{u}'"))}; this route reads {string.Join(", ", known)}.");
    }
}
