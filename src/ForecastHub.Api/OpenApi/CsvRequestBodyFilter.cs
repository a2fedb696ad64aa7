using System.Text.Json.Nodes;
using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace ForecastHub.Api.OpenApi;

/// <summary>A <c>text/csv</c> request body is text with a header row, not the JSON body's schema that
/// <c>Accepts&lt;T&gt;(..., "text/csv")</c> gives every media type it lists.</summary>
public sealed class CsvRequestBodyFilter : IOperationFilter
{
    public void Apply(OpenApiOperation operation, OperationFilterContext context)
    {
        ArgumentNullException.ThrowIfNull(operation);
        if (operation.RequestBody is OpenApiRequestBody { Content: { } content } && content.ContainsKey("text/csv"))
        {
            content["text/csv"] = new OpenApiMediaType
            {
                Schema = new OpenApiSchema
                {
                    Type = JsonSchemaType.String,
                    Description = "RFC 4180 text with a header row: time,value[,unit] (or the columns named by the query).",
                },
                Example = JsonValue.Create("time,value\r\n2025-06-01T00:00:00Z,12.5\r\n2025-06-01T01:00:00Z,12.1\r\n"),
            };
        }
    }
}
