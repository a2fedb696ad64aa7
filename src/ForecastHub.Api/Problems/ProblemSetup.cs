namespace ForecastHub.Api.Problems;

public static class ProblemSetup
{
    /// <summary>RFC 9457 problem details for every error, with the request's trace id and never
    /// an exception's details; <c>type</c> from <see cref="ProblemTypes"/>.</summary>
    public static IServiceCollection AddForecastHubProblems(this IServiceCollection services)
    {
        services.AddProblemDetails(options => options.CustomizeProblemDetails = context =>
        {
            context.ProblemDetails.Instance ??= context.HttpContext.Request.Path;
            var status = context.ProblemDetails.Status ?? context.HttpContext.Response.StatusCode;
            context.ProblemDetails.Type = ProblemTypes.Of(status) ?? context.ProblemDetails.Type;
            context.ProblemDetails.Extensions["traceId"] = context.HttpContext.TraceIdentifier;
        });
        services.AddExceptionHandler<StorageProblems>();
        return services;
    }
}
