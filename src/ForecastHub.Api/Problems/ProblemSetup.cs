namespace ForecastHub.Api.Problems;

public static class ProblemSetup
{
    /// <summary>RFC 9457 problem details for every error, with the request's trace id and never
    /// an exception's details.</summary>
    public static IServiceCollection AddForecastHubProblems(this IServiceCollection services)
    {
        services.AddProblemDetails(options => options.CustomizeProblemDetails = context =>
        {
            context.ProblemDetails.Instance ??= context.HttpContext.Request.Path;
            context.ProblemDetails.Extensions["traceId"] = context.HttpContext.TraceIdentifier;
        });
        services.AddExceptionHandler<StorageProblems>();
        return services;
    }
}
