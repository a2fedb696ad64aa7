using System.Globalization;
using System.Reflection;
using System.Text.Json.Nodes;
using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace ForecastHub.Api.OpenApi;

/// <summary>
/// Types each query parameter by its <see cref="QueryValueAttribute"/> (integer with range and default,
/// comma-separated number list, ISO 8601 instant, one of a set of values) instead of the plain string
/// the handler binds, so the document says what the handler accepts.
/// </summary>
public sealed class QueryValuesFilter : IOperationFilter
{
    public void Apply(OpenApiOperation operation, OperationFilterContext context)
    {
        ArgumentNullException.ThrowIfNull(operation);
        ArgumentNullException.ThrowIfNull(context);
        foreach (var parameter in (operation.Parameters ?? []).OfType<OpenApiParameter>().Where(p => p.In == ParameterLocation.Query))
        {
            var description = context.ApiDescription.ParameterDescriptions
                .FirstOrDefault(d => string.Equals(d.Name, parameter.Name, StringComparison.OrdinalIgnoreCase));
            var value = description?.CustomAttributes().OfType<QueryValueAttribute>().FirstOrDefault()
                ?? (description?.ParameterInfo()?.GetCustomAttribute<QueryValueAttribute>());
            if (value is not null)
            {
                parameter.Schema = Schema(value);
                if (value.Kind == QueryValueKind.NumberList)
                {
                    // Comma-separated in one parameter: OpenAPI's form style without explode.
                    parameter.Style = ParameterStyle.Form;
                    parameter.Explode = false;
                }
            }
        }
    }

    private static OpenApiSchema Schema(QueryValueAttribute value)
    {
        var schema = value.Kind switch
        {
            QueryValueKind.WholeNumber => new OpenApiSchema { Type = JsonSchemaType.Integer, Format = "int32" },
            QueryValueKind.NumberList => new OpenApiSchema
            {
                Type = JsonSchemaType.Array,
                Items = Bounded(new OpenApiSchema { Type = JsonSchemaType.Number, Format = "double" }, value),
                MaxItems = value.MaxItems > 0 ? value.MaxItems : null,
            },
            QueryValueKind.DateTime => new OpenApiSchema { Type = JsonSchemaType.String, Format = "date-time" },
            QueryValueKind.Choice => new OpenApiSchema
            {
                Type = JsonSchemaType.String,
                Enum = [.. value.Values.Select(v => (JsonNode)JsonValue.Create(v))],
            },
            _ => new OpenApiSchema { Type = JsonSchemaType.String },
        };
        if (value.Kind == QueryValueKind.WholeNumber)
        {
            Bounded(schema, value);
        }
        if (value.Default is { } fallback)
        {
            schema.Default = fallback switch
            {
                int number => JsonValue.Create(number),
                string list when value.Kind == QueryValueKind.NumberList =>
                    new JsonArray([.. list.Split(',').Select(n => (JsonNode)JsonValue.Create(double.Parse(n, CultureInfo.InvariantCulture)))]),
                _ => JsonValue.Create(Convert.ToString(fallback, CultureInfo.InvariantCulture)),
            };
        }
        return schema;
    }

    private static OpenApiSchema Bounded(OpenApiSchema schema, QueryValueAttribute value)
    {
        string? Bound(double bound) => double.IsNaN(bound) ? null : bound.ToString(CultureInfo.InvariantCulture);
        if (value.ExclusiveBounds)
        {
            schema.ExclusiveMinimum = Bound(value.Minimum);
            schema.ExclusiveMaximum = Bound(value.Maximum);
        }
        else
        {
            schema.Minimum = Bound(value.Minimum);
            schema.Maximum = Bound(value.Maximum);
        }
        return schema;
    }
}
