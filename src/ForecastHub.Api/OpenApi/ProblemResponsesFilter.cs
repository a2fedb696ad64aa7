using ForecastHub.Api.Auth;
using Microsoft.AspNetCore.Authorization;
using Microsoft.AspNetCore.Mvc;
using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace ForecastHub.Api.OpenApi;

/// <summary>
/// Adds what every endpoint shares by convention, so new endpoints are described without extra
/// work: the Bearer requirement and 401/403/429 on endpoints that need a key, 404 where the route
/// names a site, key or webhook, 400 where query parameters are read, 400/413/415 where a body is accepted,
/// and problem+json on each of them.
/// </summary>
public sealed class ProblemResponsesFilter : IOperationFilter
{
    public void Apply(OpenApiOperation operation, OperationFilterContext context)
    {
        ArgumentNullException.ThrowIfNull(operation);
        ArgumentNullException.ThrowIfNull(context);
        var metadata = context.ApiDescription.ActionDescriptor.EndpointMetadata;
        var policies = metadata.OfType<IAuthorizeData>().Select(a => a.Policy).Where(p => p is not null).ToList();
        var needsKey = policies.Count > 0 && !metadata.OfType<IAllowAnonymous>().Any();
        operation.Responses ??= [];

        if (needsKey)
        {
            operation.Security ??= [];
            operation.Security.Add(new OpenApiSecurityRequirement
            {
                [new OpenApiSecuritySchemeReference(OpenApiSetup.BearerScheme, context.Document)] = [],
            });
            var scope = policies.Contains(AuthPolicies.Admin) ? "an admin key"
                : policies.Contains(AuthPolicies.Ingest) ? "an admin key, or an ingest key for this site"
                : "a read or admin key (no key when anonymous reads are on)";
            operation.Description = $"Needs {scope}.";
            Add(operation, context, StatusCodes.Status401Unauthorized, "No key, a malformed Authorization header, or an unknown or revoked key.");
            Add(operation, context, StatusCodes.Status403Forbidden, "The key's scope does not allow this call.");
            Add(operation, context, StatusCodes.Status429TooManyRequests, "This key made too many requests; see Retry-After.");
        }

        if (metadata.OfType<Http.ConditionalGet>().Any())
        {
            operation.Responses["304"] = new OpenApiResponse { Description = "Not modified: the If-None-Match ETag still matches; no body." };
        }

        if (metadata.OfType<SuccessFormats>().FirstOrDefault() is { } formats
            && operation.Responses.TryGetValue("200", out var answer) && answer is OpenApiResponse ok)
        {
            DescribeSuccessFormats(ok, formats, context);
        }

        var route = context.ApiDescription.RelativePath ?? "";
        if (route.Contains("{siteId}", StringComparison.Ordinal) || route.Contains("{keyId}", StringComparison.Ordinal)
            || route.Contains("{webhookId}", StringComparison.Ordinal))
        {
            Add(operation, context, StatusCodes.Status404NotFound, "No such site, key or webhook.");
        }

        if (operation.Parameters?.Any(p => p.In == ParameterLocation.Query) == true)
        {
            Add(operation, context, StatusCodes.Status400BadRequest, "A query parameter is invalid; the problem names it.");
        }

        if (operation.RequestBody is not null || context.ApiDescription.SupportedRequestFormats.Count > 0)
        {
            Add(operation, context, StatusCodes.Status400BadRequest, "The body is malformed or a field is invalid; the problem names the field.");
            Add(operation, context, StatusCodes.Status413PayloadTooLarge, "The body is larger than this endpoint accepts.");
            Add(operation, context, StatusCodes.Status415UnsupportedMediaType, "The Content-Type is not one this endpoint reads.");
        }
    }

    private static void DescribeSuccessFormats(OpenApiResponse ok, SuccessFormats formats, OperationFilterContext context)
    {
        ok.Content ??= new Dictionary<string, OpenApiMediaType>();
        if (formats.JsonTypes.Count > 0)
        {
            var schemas = formats.JsonTypes.Select(t => context.SchemaGenerator.GenerateSchema(t, context.SchemaRepository)).ToList();
            ok.Content["application/json"] = new OpenApiMediaType
            {
                Schema = schemas.Count == 1 ? schemas[0] : new OpenApiSchema { OneOf = schemas },
            };
        }
        if (formats.Csv)
        {
            ok.Content["text/csv"] = new OpenApiMediaType { Schema = new OpenApiSchema { Type = JsonSchemaType.String } };
        }
    }

    private static void Add(OpenApiOperation operation, OperationFilterContext context, int status, string description)
    {
        var code = status.ToString(System.Globalization.CultureInfo.InvariantCulture);
        if (operation.Responses!.TryGetValue(code, out var existing))
        {
            // One status, several causes (a bad query parameter or a bad body): the description names each.
            if (existing is OpenApiResponse { Description: { } said } shared && !said.Contains(description, StringComparison.Ordinal))
            {
                shared.Description = $"{said} Or: {description}";
            }
            return;
        }
        operation.Responses[code] = new OpenApiResponse
        {
            Description = description,
            Content = new Dictionary<string, OpenApiMediaType>
            {
                ["application/problem+json"] = new()
                {
                    Schema = context.SchemaGenerator.GenerateSchema(typeof(ProblemDetails), context.SchemaRepository),
                },
            },
        };
    }
}
