using Serilog;
using Serilog.Events;
using Serilog.Formatting.Compact;

namespace ForecastHub.Api.Hosting;

public static class LoggingSetup
{
    /// <summary>Structured JSON console logs. Request lines carry method, path (no query string),
    /// status and time only: never keys, headers or bodies.</summary>
    public static WebApplicationBuilder AddForecastHubLogging(this WebApplicationBuilder builder)
    {
        ArgumentNullException.ThrowIfNull(builder);
        builder.Services.AddSerilog((services, config) => config
            // The framework's own per-request lines would add a second line with the query string.
            .MinimumLevel.Override("Microsoft.AspNetCore", LogEventLevel.Warning)
            .ReadFrom.Configuration(services.GetRequiredService<IConfiguration>())
            .Enrich.FromLogContext()
            .WriteTo.Console(new RenderedCompactJsonFormatter()));
        return builder;
    }
}
