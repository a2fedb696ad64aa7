using ForecastHub.Api.Http;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Hosting;

public static class SecurityHeaders
{
    /// <summary>Pages and charts load only their own scripts, styles and images. Swagger UI's page
    /// sets inline styles, hence 'unsafe-inline' for styles only. Framing follows <c>Framing:Ancestors</c>.</summary>
    public static string ContentSecurityPolicy(string frameAncestors) =>
        "default-src 'self'; script-src 'self'; style-src 'self' 'unsafe-inline'; img-src 'self' data:; " +
        $"object-src 'none'; base-uri 'none'; frame-ancestors {frameAncestors}; form-action 'self'";

    /// <summary>nosniff on every answer; on HTML and SVG (which can carry script) also a content
    /// security policy, a framing policy, no referrer and no powerful browser features.</summary>
    public static WebApplication UseSecurityHeaders(this WebApplication app)
    {
        ArgumentNullException.ThrowIfNull(app);
        var (policy, frameOptions) = Framing(app.Services.GetRequiredService<IOptions<FramingOptions>>().Value.Ancestors);
        app.Use((context, next) =>
        {
            context.Response.OnStarting(() =>
            {
                var headers = context.Response.Headers;
                headers.XContentTypeOptions = "nosniff";
                var type = context.Response.ContentType ?? "";
                if (type.StartsWith("text/html", StringComparison.OrdinalIgnoreCase)
                    || type.StartsWith("image/svg+xml", StringComparison.OrdinalIgnoreCase))
                {
                    headers.ContentSecurityPolicy = policy;
                    if (frameOptions is not null)
                    {
                        headers.XFrameOptions = frameOptions;
                    }
                    headers["Referrer-Policy"] = "no-referrer";
                    headers["Permissions-Policy"] = "camera=(), microphone=(), geolocation=(), payment=()";
                    headers["Cross-Origin-Opener-Policy"] = "same-origin";
                }
                return Task.CompletedTask;
            });
            return next(context);
        });
        return app;
    }

    /// <summary>The policy and the legacy X-Frame-Options that says the same: DENY for no framing,
    /// SAMEORIGIN for 'self' alone, and none for other origins (the legacy header cannot name them,
    /// and browsers that know frame-ancestors ignore it).</summary>
    private static (string Policy, string? FrameOptions) Framing(string? ancestors)
    {
        var sources = string.Join(' ', (ancestors ?? "").Split(' ', StringSplitOptions.RemoveEmptyEntries));
        return sources switch
        {
            "" or "'none'" => (ContentSecurityPolicy("'none'"), "DENY"),
            "'self'" => (ContentSecurityPolicy("'self'"), "SAMEORIGIN"),
            _ => (ContentSecurityPolicy(sources), null),
        };
    }
}
