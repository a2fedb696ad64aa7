using System.Globalization;
using System.Text.Json;
using System.Text.Json.Nodes;
using Microsoft.AspNetCore.Http.Json;
using Microsoft.Extensions.Options;
using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace ForecastHub.Api.OpenApi;

/// <summary>
/// Puts an example on every JSON request body and success answer whose type <see cref="ApiExamples"/> has,
/// serialised with the service's own JSON options (so field names and formats are those of real answers),
/// one named example per type where the answer is one of several; and the forecast's CSV and chart.
/// </summary>
public sealed class SuccessExamplesFilter(IOptions<JsonOptions> json) : IOperationFilter
{
    public void Apply(OpenApiOperation operation, OperationFilterContext context)
    {
        ArgumentNullException.ThrowIfNull(operation);
        ArgumentNullException.ThrowIfNull(context);
        var metadata = context.ApiDescription.ActionDescriptor.EndpointMetadata;
        if (operation.RequestBody is OpenApiRequestBody { Content: { } bodies }
            && bodies.TryGetValue("application/json", out var body)
            && metadata.OfType<Microsoft.AspNetCore.Http.Metadata.IAcceptsMetadata>().FirstOrDefault()?.RequestType is { } requestType
            && Example(requestType) is { } request)
        {
            body.Example = request;
        }

        foreach (var (code, answer) in operation.Responses ?? [])
        {
            if (!code.StartsWith('2') || answer is not OpenApiResponse { Content: { } content })
            {
                continue;
            }
            var status = int.Parse(code, CultureInfo.InvariantCulture);
            var types = metadata.OfType<SuccessFormats>().FirstOrDefault() is { JsonTypes.Count: > 0 } formats && status == StatusCodes.Status200OK
                ? formats.JsonTypes
                : [.. context.ApiDescription.SupportedResponseTypes.Where(r => r.StatusCode == status && r.Type is not null).Select(r => r.Type!).Distinct()];
            var examples = types.Where(ApiExamples.ByType.ContainsKey).ToList();
            if (content.TryGetValue("application/json", out var media) && examples.Count > 0)
            {
                if (examples.Count == 1)
                {
                    media.Example = Example(examples[0]);
                }
                else
                {
                    media.Examples = examples.ToDictionary(t => t.Name, t => (IOpenApiExample)new OpenApiExample { Value = Example(t) });
                }
            }
            if (content.TryGetValue("text/csv", out var csv) && examples.Contains(typeof(Forecasts.ForecastResponse)))
            {
                csv.Example = JsonValue.Create(ApiExamples.ForecastCsvText);
            }
            if (content.TryGetValue("image/svg+xml", out var svg))
            {
                svg.Example = JsonValue.Create(ApiExamples.ForecastSvg);
            }
        }
    }

    private JsonNode? Example(Type type) =>
        ApiExamples.ByType.TryGetValue(type, out var sample) ? JsonSerializer.SerializeToNode(sample, type, json.Value.SerializerOptions) : null;
}
