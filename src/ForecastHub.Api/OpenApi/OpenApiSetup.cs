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
            // Descriptions of parameters, bodies, answers and their fields from the code's XML docs.
            options.IncludeXmlComments(typeof(OpenApiSetup).Assembly);
            options.OperationFilter<ProblemResponsesFilter>();
            options.OperationFilter<QueryValuesFilter>();
            options.OperationFilter<CsvRequestBodyFilter>();
            options.OperationFilter<PathParametersFilter>();
            options.OperationFilter<SuccessExamplesFilter>();
            options.DocumentFilter<MetricsDocumentFilter>();
            options.DocumentFilter<ProblemTypesDocumentFilter>();
            var defaultSchemaId = options.SchemaGeneratorOptions.SchemaIdSelector;
            options.SchemaGeneratorOptions.SchemaIdSelector = type => SchemaId(type, defaultSchemaId);
            options.SupportNonNullableReferenceTypes();
            // A nullable object field (confidenceReason, nextDay, lastAttempt) as allOf [$ref] beside nullable: true: OpenAPI 3.0 ignores siblings of a bare $ref.
            options.UseAllOfToExtendReferenceSchemas();
        });
        return services;
    }

    // Schema names clients already see, kept for types renamed since so that the contract does not change.
    private static readonly Dictionary<Type, string> PublishedNames = new()
    {
        [typeof(Models.ModelResponse)] = "ModelsModelResponse",
        [typeof(Sites.SiteModelSettingsResponse)] = "SitesModelResponse",
        [typeof(Forecasts.ForecastStepResponse)] = "ForecastsForecastStep",
        [typeof(Forecasts.NextDaySummaryResponse)] = "ForecastsNextDaySummary",
        [typeof(Forecasts.ThresholdProbabilityResponse)] = "ForecastsThresholdProbability",
    };

    private static string SchemaId(Type type, Func<Type, string> fallback) =>
        PublishedNames.TryGetValue(type, out var name) ? name : fallback(type);

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
