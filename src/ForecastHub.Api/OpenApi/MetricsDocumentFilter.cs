using System.Net.Http;
using ForecastHub.Api.Metrics;
using Microsoft.AspNetCore.Mvc;
using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace ForecastHub.Api.OpenApi;

/// <summary>Describes <c>GET /metrics</c>, which the Prometheus exporter maps as a plain endpoint that
/// the API explorer does not see.</summary>
public sealed class MetricsDocumentFilter : IDocumentFilter
{
    /// <summary>A few series of a scrape of the demo's low orchard (values invented); a test checks each family against a real scrape.</summary>
    public const string Example =
        "# TYPE forecasthub_readings_total counter\n" +
        "forecasthub_readings_total{outcome=\"accepted\"} 18240\n" +
        "forecasthub_readings_total{outcome=\"flagged\"} 12\n" +
        "# TYPE forecasthub_site_health gauge\n" +
        "forecasthub_site_health{site=\"" + ApiExamples.SiteId + "\",state=\"ok\"} 1\n" +
        "# TYPE forecasthub_site_reading_age_seconds gauge\n" +
        "forecasthub_site_reading_age_seconds{site=\"" + ApiExamples.SiteId + "\"} 420\n";

    public void Apply(OpenApiDocument swaggerDoc, DocumentFilterContext context)
    {
        ArgumentNullException.ThrowIfNull(swaggerDoc);
        ArgumentNullException.ThrowIfNull(context);
        var problem = context.SchemaGenerator.GenerateSchema(typeof(ProblemDetails), context.SchemaRepository);
        OpenApiResponse Problem(string description) => new()
        {
            Description = description,
            Content = new Dictionary<string, OpenApiMediaType> { ["application/problem+json"] = new() { Schema = problem } },
        };

        swaggerDoc.Paths ??= [];
        swaggerDoc.Paths[MetricsEndpoints.Path] = new OpenApiPathItem
        {
            Operations = new Dictionary<HttpMethod, OpenApiOperation>
            {
                [HttpMethod.Get] = new()
                {
                    OperationId = "GetMetrics",
                    Tags = new HashSet<OpenApiTagReference> { new("Metrics", swaggerDoc) },
                    Summary = "Service, HTTP server and .NET runtime metrics in Prometheus text format 0.0.4.",
                    Description = "Needs a read or admin key (no key when anonymous reads are on), except on the local port " +
                        "named by Metrics:AnonymousPort. Never rate limited.",
                    Responses = new OpenApiResponses
                    {
                        ["200"] = new OpenApiResponse
                        {
                            Description = "OK",
                            Content = new Dictionary<string, OpenApiMediaType>
                            {
                                ["text/plain"] = new()
                                {
                                    Schema = new OpenApiSchema { Type = JsonSchemaType.String },
                                    Example = System.Text.Json.Nodes.JsonValue.Create(Example),
                                },
                            },
                        },
                        ["401"] = Problem("No key, a malformed Authorization header, or an unknown or revoked key."),
                        ["403"] = Problem("The key's scope does not allow this call."),
                    },
                    Security =
                    [
                        new OpenApiSecurityRequirement { [new OpenApiSecuritySchemeReference(OpenApiSetup.BearerScheme, swaggerDoc)] = [] },
                    ],
                },
            },
        };
    }
}
