using Microsoft.AspNetCore.Http.HttpResults;

namespace ForecastHub.Api.Problems;

/// <summary>The problem answers the endpoints share, each with a reason a person can act on.</summary>
public static class ApiProblems
{
    public static ProblemHttpResult BadRequest(string field, string detail) =>
        TypedResults.Problem(detail: detail, statusCode: StatusCodes.Status400BadRequest, title: "Invalid request",
            extensions: new Dictionary<string, object?> { ["field"] = field });

    public static ProblemHttpResult NotFound(string detail) =>
        TypedResults.Problem(detail: detail, statusCode: StatusCodes.Status404NotFound, title: "Not found");

    public static ProblemHttpResult Conflict(string detail) =>
        TypedResults.Problem(detail: detail, statusCode: StatusCodes.Status409Conflict, title: "Conflict");

    public static ProblemHttpResult TooLarge(string detail) =>
        TypedResults.Problem(detail: detail, statusCode: StatusCodes.Status413PayloadTooLarge, title: "Request too large");

    public static ProblemHttpResult UnsupportedMediaType(string detail) =>
        TypedResults.Problem(detail: detail, statusCode: StatusCodes.Status415UnsupportedMediaType, title: "Unsupported media type");

    public static ValidationProblem Invalid(IDictionary<string, string[]> errors) =>
        TypedResults.ValidationProblem(errors, title: "Invalid request",
            detail: string.Join(" ", errors.Select(e => $"{e.Key}: {string.Join(" ", e.Value)}")));
}
