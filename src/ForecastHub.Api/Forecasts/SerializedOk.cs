using System.Reflection;
using Microsoft.AspNetCore.Http.Metadata;

namespace ForecastHub.Api.Forecasts;

/// <summary>
/// A 200 answer whose JSON body of <typeparamref name="TValue"/> was serialised earlier: it writes the
/// stored UTF-8 bytes with the content type <c>Ok&lt;T&gt;</c> uses, and describes itself to OpenAPI as
/// <c>Ok&lt;TValue&gt;</c> does, so clients and the contract see no difference.
/// </summary>
public sealed class SerializedOk<TValue>(ReadOnlyMemory<byte> json) : IResult, IEndpointMetadataProvider, IStatusCodeHttpResult, IContentTypeHttpResult
{
    public const string JsonContentType = "application/json; charset=utf-8";

    public int? StatusCode => StatusCodes.Status200OK;

    public string ContentType => JsonContentType;

    public ReadOnlyMemory<byte> Json => json;

    public Task ExecuteAsync(HttpContext httpContext)
    {
        ArgumentNullException.ThrowIfNull(httpContext);
        httpContext.Response.StatusCode = StatusCodes.Status200OK;
        httpContext.Response.ContentType = JsonContentType;
        return httpContext.Response.Body.WriteAsync(json, httpContext.RequestAborted).AsTask();
    }

    // The interface requires a static member here; it is what Ok<TValue> does too.
#pragma warning disable CA1000
    public static void PopulateMetadata(MethodInfo method, EndpointBuilder builder)
    {
        ArgumentNullException.ThrowIfNull(builder);
        builder.Metadata.Add(new ProducesResponseTypeMetadata(StatusCodes.Status200OK, typeof(TValue), ["application/json"]));
    }
#pragma warning restore CA1000
}
