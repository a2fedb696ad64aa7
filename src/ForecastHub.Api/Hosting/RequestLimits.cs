using ForecastHub.Api.Problems;
using Microsoft.AspNetCore.Http.Features;
using Microsoft.AspNetCore.Http.Metadata;
using Microsoft.AspNetCore.Server.Kestrel.Core;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Hosting;

/// <summary>Configuration section <c>Limits</c>.</summary>
public sealed class RequestLimitOptions
{
    public const string SectionName = "Limits";

    /// <summary>Body limit for endpoints that declare none with <c>WithRequestBodyLimit</c>.</summary>
    public long DefaultMaxRequestBodyBytes { get; set; } = 64 * 1024;
}

/// <summary>An endpoint's own body limit; the middleware below applies it.</summary>
public sealed class RequestBodyLimit(long maxBytes) : IRequestSizeLimitMetadata
{
    public long? MaxRequestBodySize { get; } = maxBytes;
}

public static class RequestLimits
{
    public static IServiceCollection AddForecastHubRequestLimits(this IServiceCollection services)
    {
        services.AddOptions<RequestLimitOptions>()
            .BindConfiguration(RequestLimitOptions.SectionName)
            .Validate(o => o.DefaultMaxRequestBodyBytes > 0, "Limits:DefaultMaxRequestBodyBytes must be positive.")
            .ValidateOnStart();
        // No Server header: it tells a stranger which server to probe. Kestrel's minimum body data
        // rate (240 bytes/s after a 5 s grace) stays on: a trickled body ends in a 408.
        services.Configure<KestrelServerOptions>(kestrel => kestrel.AddServerHeader = false);
        return services;
    }

    /// <summary>Declares the largest body this endpoint accepts (413 beyond).</summary>
    public static TBuilder WithRequestBodyLimit<TBuilder>(this TBuilder builder, long maxBytes)
        where TBuilder : IEndpointConventionBuilder =>
        builder.WithMetadata(new RequestBodyLimit(maxBytes));

    /// <summary>Gives every request the body limit of its endpoint (or the default): a declared
    /// Content-Length above it is refused with 413 before anything reads the body, the server
    /// stops a longer body at the limit, and a chunked body is counted by its payload.</summary>
    public static WebApplication UseRequestBodyLimits(this WebApplication app)
    {
        ArgumentNullException.ThrowIfNull(app);
        app.Use(async (context, next) =>
        {
            var limit = context.GetEndpoint()?.Metadata.GetMetadata<IRequestSizeLimitMetadata>()?.MaxRequestBodySize
                ?? context.RequestServices.GetRequiredService<IOptions<RequestLimitOptions>>().Value.DefaultMaxRequestBodyBytes;
            if (context.Request.ContentLength > limit)
            {
                await MiddlewareProblems.WriteAsync(context, StatusCodes.Status413PayloadTooLarge, "Request too large",
                    $"This endpoint accepts bodies of at most {limit} bytes; split the request.").ConfigureAwait(false);
                return;
            }
            if (context.Features.Get<IHttpMaxRequestBodySizeFeature>() is { IsReadOnly: false } feature)
            {
                if (context.Request.ContentLength is null && context.Request.Headers.TransferEncoding.Count > 0)
                {
                    // The server would count chunk framing too; the limit is on the payload.
                    feature.MaxRequestBodySize = null;
                    context.Request.Body = new PayloadLimitStream(context.Request.Body, limit);
                }
                else
                {
                    feature.MaxRequestBodySize = limit;
                }
            }
            await next(context).ConfigureAwait(false);
        });
        return app;
    }
}
