namespace ForecastHub.Api.Problems;

/// <summary>Problem answers written by middleware, outside any endpoint's result.</summary>
public static class MiddlewareProblems
{
    public static ValueTask WriteAsync(HttpContext context, int status, string title, string detail)
    {
        ArgumentNullException.ThrowIfNull(context);
        context.Response.StatusCode = status;
        return context.RequestServices.GetRequiredService<IProblemDetailsService>().WriteAsync(new ProblemDetailsContext
        {
            HttpContext = context,
            ProblemDetails = { Status = status, Title = title, Detail = detail },
        });
    }
}
