namespace ForecastHub.Api.Hosting;

public static class SecurityHeaders
{
    /// <summary>Pages and charts load only their own scripts, styles and images and cannot be framed.
    /// Swagger UI's page sets inline styles, hence 'unsafe-inline' for styles only.</summary>
    public const string ContentSecurityPolicy =
        "default-src 'self'; script-src 'self'; style-src 'self' 'unsafe-inline'; img-src 'self' data:; " +
        "object-src 'none'; base-uri 'none'; frame-ancestors 'none'; form-action 'self'";

    /// <summary>nosniff on every answer; on HTML and SVG (which can carry script) also a content
    /// security policy, no framing, no referrer and no powerful browser features.</summary>
    public static WebApplication UseSecurityHeaders(this WebApplication app)
    {
        ArgumentNullException.ThrowIfNull(app);
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
                    headers.ContentSecurityPolicy = ContentSecurityPolicy;
                    headers.XFrameOptions = "DENY";
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
}
