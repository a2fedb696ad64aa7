using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace ForecastHub.Api.OpenApi;

/// <summary>Describes the ids that routes name, once for every route that carries them.</summary>
public sealed class PathParametersFilter : IOperationFilter
{
    private static readonly Dictionary<string, string> Descriptions = new(StringComparer.Ordinal)
    {
        ["siteId"] = "The site's id, as given when it was created (lower-case letters, digits and hyphens).",
        ["keyId"] = "The key's id from its creation answer or the key list (never the secret).",
        ["webhookId"] = "The webhook's id from its creation answer or the webhook list ('wh-' and 16 hexadecimal digits).",
    };

    public void Apply(OpenApiOperation operation, OperationFilterContext context)
    {
        ArgumentNullException.ThrowIfNull(operation);
        foreach (var parameter in (operation.Parameters ?? []).OfType<OpenApiParameter>().Where(p => p.In == ParameterLocation.Path))
        {
            if (parameter.Description is null && parameter.Name is { } name && Descriptions.TryGetValue(name, out var description))
            {
                parameter.Description = description;
            }
        }
    }
}
