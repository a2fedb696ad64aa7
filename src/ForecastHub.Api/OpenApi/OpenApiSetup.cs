using Microsoft.OpenApi;

namespace ForecastHub.Api.OpenApi;

public static class OpenApiSetup
{
    public const string DocumentName = "v1";
    public const string DocumentPath = "/swagger/v1/swagger.json";
    public const string BearerScheme = "Bearer";

    /// <summary>The OpenAPI description of every endpoint: names and summaries from the endpoints,
    /// the Bearer key scheme, and problem answers added by <see cref="ProblemResponsesFilter"/>.</summary>
    public static IServiceCollection AddForecastHubOpenApi(this IServiceCollection services)
    {
        services.AddEndpointsApiExplorer();
        services.AddSwaggerGen(options =>
        {
            options.SwaggerDoc(DocumentName, new OpenApiInfo
            {
                Title = "ForecastHub API",
                Version = "v1",
                Description = "Per-site next-day temperature forecasts from each site's own measured history. " +
                    "Errors are application/problem+json (RFC 9457). Send keys as 'Authorization: Bearer <key>'. " +
                    "Forecasts are statistical and cannot see an approaching front: for frost protection, heat stress, " +
                    "road ice and other decisions where people or property are at risk, official warnings, local codes " +
                    "and licensed practice come first.",
            });
            options.AddSecurityDefinition(BearerScheme, new OpenApiSecurityScheme
            {
                Type = SecuritySchemeType.Http,
                Scheme = "bearer",
                BearerFormat = "API key",
                Description = "An API key: scope admin (everything), ingest (posting observations, to all or to listed sites) " +
                    "or read (every read). Reads need no key when the service runs with Auth:AllowAnonymousRead=true.",
            });
            options.OperationFilter<ProblemResponsesFilter>();
            options.DocumentFilter<MetricsDocumentFilter>();
            var defaultSchemaId = options.SchemaGeneratorOptions.SchemaIdSelector;
            options.SchemaGeneratorOptions.SchemaIdSelector = type => SchemaId(type, defaultSchemaId);
            options.SupportNonNullableReferenceTypes();
        });
        return services;
    }

    // Simple type names that two of the service's public types share (e.g. Sites.ModelResponse and Models.ModelResponse).
    private static readonly Lazy<HashSet<string>> SharedNames = new(() =>
        [.. new[] { typeof(OpenApiSetup).Assembly, typeof(ForecastHub.Storage.StorageOptions).Assembly, typeof(ForecastHub.Core.Quality.QualityFlags).Assembly }
            .SelectMany(a => a.GetExportedTypes())
            .GroupBy(t => t.Name, StringComparer.Ordinal)
            .Where(g => g.Count() > 1)
            .Select(g => g.Key)]);

    /// <summary>The plain type name, prefixed with its feature folder when another type shares it,
    /// so schema names stay short and stable and never collide.</summary>
    private static string SchemaId(Type type, Func<Type, string> fallback) =>
        !type.IsGenericType && SharedNames.Value.Contains(type.Name) && type.Namespace is { } ns
            ? ns[(ns.LastIndexOf('.') + 1)..] + fallback(type)
            : fallback(type);

    /// <summary>The document at <see cref="DocumentPath"/> and Swagger UI at <c>/swagger</c>; both public.</summary>
    public static WebApplication UseForecastHubOpenApi(this WebApplication app)
    {
        ArgumentNullException.ThrowIfNull(app);
        app.UseSwagger();
        app.UseSwaggerUI(options =>
        {
            options.SwaggerEndpoint(DocumentPath, "ForecastHub API v1");
            options.RoutePrefix = "swagger";
            options.DocumentTitle = "ForecastHub API";
        });
        return app;
    }
}
