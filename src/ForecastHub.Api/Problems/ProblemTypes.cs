namespace ForecastHub.Api.Problems;

/// <summary>
/// The problem <c>type</c> URI of each error status: the section of the standard that defines the
/// status (RFC 9110, RFC 6585 for 429, RFC 4918 for 507). Every problem answer carries it, and the
/// OpenAPI document names it per status, so clients can branch on <c>type</c> as RFC 9457 intends.
/// </summary>
public static class ProblemTypes
{
    private const string Http = "https://tools.ietf.org/html/rfc9110#section-";

    private static readonly Dictionary<int, string> ByStatus = new()
    {
        [StatusCodes.Status400BadRequest] = Http + "15.5.1",
        [StatusCodes.Status401Unauthorized] = Http + "15.5.2",
        [StatusCodes.Status403Forbidden] = Http + "15.5.4",
        [StatusCodes.Status404NotFound] = Http + "15.5.5",
        [StatusCodes.Status405MethodNotAllowed] = Http + "15.5.6",
        [StatusCodes.Status406NotAcceptable] = Http + "15.5.7",
        [StatusCodes.Status408RequestTimeout] = Http + "15.5.9",
        [StatusCodes.Status409Conflict] = Http + "15.5.10",
        [StatusCodes.Status412PreconditionFailed] = Http + "15.5.13",
        [StatusCodes.Status413PayloadTooLarge] = Http + "15.5.14",
        [StatusCodes.Status415UnsupportedMediaType] = Http + "15.5.16",
        [StatusCodes.Status422UnprocessableEntity] = Http + "15.5.21",
        [StatusCodes.Status429TooManyRequests] = "https://tools.ietf.org/html/rfc6585#section-4",
        [StatusCodes.Status500InternalServerError] = Http + "15.6.1",
        [StatusCodes.Status502BadGateway] = Http + "15.6.3",
        [StatusCodes.Status503ServiceUnavailable] = Http + "15.6.4",
        [StatusCodes.Status504GatewayTimeout] = Http + "15.6.5",
        [StatusCodes.Status507InsufficientStorage] = "https://tools.ietf.org/html/rfc4918#section-11.5",
    };

    /// <summary>The type URI of <paramref name="status"/>, or null for a status the service never answers with a problem.</summary>
    public static string? Of(int status) => ByStatus.GetValueOrDefault(status);
}
