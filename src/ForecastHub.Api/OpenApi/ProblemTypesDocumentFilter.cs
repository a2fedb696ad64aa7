using System.Globalization;
using System.Text.Json.Nodes;
using ForecastHub.Api.Problems;
using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace ForecastHub.Api.OpenApi;

/// <summary>Names the problem <c>type</c> of every documented error status (from <see cref="ProblemTypes"/>,
/// the table the answers use) in the response description and in an example body. Runs after every
/// other filter, so statuses added by any of them are covered.</summary>
public sealed partial class ProblemTypesDocumentFilter : IDocumentFilter
{
    public void Apply(OpenApiDocument swaggerDoc, DocumentFilterContext context)
    {
        ArgumentNullException.ThrowIfNull(swaggerDoc);
        var responses = (swaggerDoc.Paths ?? []).Values
            .SelectMany(p => p.Operations?.Values.AsEnumerable() ?? [])
            .SelectMany(o => o.Responses?.AsEnumerable() ?? []);
        foreach (var (code, answer) in responses)
        {
            if (answer is not OpenApiResponse response
                || !int.TryParse(code, NumberStyles.None, CultureInfo.InvariantCulture, out var status)
                || ProblemTypes.Of(status) is not { } type
                || response.Content?.TryGetValue("application/problem+json", out var problem) != true
                || response.Description?.Contains("Problem type:", StringComparison.Ordinal) == true)
            {
                continue;
            }
            // An XML <response> doc wrapped over several source lines reads as one paragraph.
            var reason = string.IsNullOrEmpty(response.Description) ? ReasonPhrase(status) : LineBreaks().Replace(response.Description, " ").TrimEnd('.');
            response.Description = $"{reason}. Problem type: {type}";
            problem!.Example = new JsonObject
            {
                ["type"] = type,
                ["status"] = status,
                ["detail"] = reason + ".",
            };
        }
    }

    [System.Text.RegularExpressions.GeneratedRegex(@"\s*\n\s*")]
    private static partial System.Text.RegularExpressions.Regex LineBreaks();

    private static string ReasonPhrase(int status) => Microsoft.AspNetCore.WebUtilities.ReasonPhrases.GetReasonPhrase(status);
}
