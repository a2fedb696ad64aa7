namespace ForecastHub.Api.OpenApi;

/// <summary>Endpoint metadata for a 200 answer that comes in more than one shape: any of
/// <see cref="JsonTypes"/> as JSON, and CSV when <see cref="Csv"/> (by <c>format=csv</c> or
/// <c>Accept: text/csv</c>). The handler's union of results names only one of them to the API explorer.</summary>
public sealed record SuccessFormats(IReadOnlyList<Type> JsonTypes, bool Csv);

public static class SuccessFormatsExtensions
{
    public static RouteHandlerBuilder WithSuccessFormats(this RouteHandlerBuilder builder, bool csv, params Type[] jsonTypes)
    {
        ArgumentNullException.ThrowIfNull(builder);
        return builder.WithMetadata(new SuccessFormats(jsonTypes, csv));
    }
}
