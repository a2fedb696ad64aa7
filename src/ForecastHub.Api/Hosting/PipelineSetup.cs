using Serilog;

namespace ForecastHub.Api.Hosting;

public static class PipelineSetup
{
    /// <summary>Request logging, problem+json for every error, then authentication and
    /// authorization; features map their endpoints after this.</summary>
    public static WebApplication UseForecastHubPipeline(this WebApplication app)
    {
        ArgumentNullException.ThrowIfNull(app);
        app.UseSerilogRequestLogging(options =>
            options.MessageTemplate = "HTTP {RequestMethod} {RequestPath} responded {StatusCode} in {Elapsed:0.0} ms");
        app.UseExceptionHandler();
        app.UseStatusCodePages();
        app.UseAuthentication();
        app.UseAuthorization();
        return app;
    }
}
