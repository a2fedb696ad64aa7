using ForecastHub.Api.Http;
using ForecastHub.Api.OpenApi;
using Serilog;

namespace ForecastHub.Api.Hosting;

public static class PipelineSetup
{
    /// <summary>Request logging, problem+json for every error, security headers, the OpenAPI
    /// document, per-endpoint body limits, then authentication, the per-key rate limit and
    /// authorization; features map their endpoints after this.</summary>
    public static WebApplication UseForecastHubPipeline(this WebApplication app)
    {
        ArgumentNullException.ThrowIfNull(app);
        app.UseForwardedHeadersFromKnownProxies();
        app.UseSerilogRequestLogging(options =>
            options.MessageTemplate = "HTTP {RequestMethod} {RequestPath} responded {StatusCode} in {Elapsed:0.0} ms");
        // What the server refuses while the app reads a body (broken chunk framing, a body below the
        // minimum data rate, one past the limit) keeps the server's 4xx status instead of a 500.
        app.UseExceptionHandler(new ExceptionHandlerOptions
        {
            StatusCodeSelector = error => error is BadHttpRequestException bad ? bad.StatusCode : StatusCodes.Status500InternalServerError,
        });
        app.UseStatusCodePages();
        app.UseSecurityHeaders();
        app.UseForecastHubOpenApi();
        app.UseRouting();
        app.UseRequestBodyLimits();
        app.UseConfiguredCors();
        app.UseAuthentication();
        // After authentication, so the limit is counted per key; before authorization, so refused
        // calls count too.
        app.UseRateLimiter();
        app.UseAuthorization();
        return app;
    }
}
