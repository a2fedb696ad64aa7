using System.Diagnostics.Metrics;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Health;
using Microsoft.AspNetCore.Authorization;
using Microsoft.Extensions.Options;
using OpenTelemetry.Metrics;
using OpenTelemetry.Resources;

namespace ForecastHub.Api.Metrics;

public static class MetricsEndpoints
{
    /// <summary>Sites-per-state counts older than this are recomputed before a scrape is answered.</summary>
    public static readonly TimeSpan FleetMaxAge = TimeSpan.FromMinutes(1);

    /// <summary>
    /// The service's instruments plus ASP.NET Core's HTTP server and Kestrel meters, rate-limiter
    /// meter and the .NET runtime meter, exported in Prometheus text by OpenTelemetry's exporter.
    /// Meters made by another host's factory in the same process are dropped, so each host reports
    /// only its own counts.
    /// </summary>
    public static IServiceCollection AddForecastHubMetrics(this IServiceCollection services)
    {
        services.AddOptions<MetricsOptions>()
            .BindConfiguration(MetricsOptions.SectionName)
            .Validate(o => o.AnonymousPort is >= 0 and <= 65_535, "Metrics:AnonymousPort must be from 0 (off) to 65535.")
            .Validate(o => o.MaxSiteSeries is >= 0 and <= 100_000, "Metrics:MaxSiteSeries must be from 0 to 100000.")
            .ValidateOnStart();
        services.AddSingleton<ServiceMetrics>();
        services.AddSingleton<FleetGauges>();
        services.AddSingleton<IAuthorizationHandler, PrivatePortScrapeHandler>();
        services.AddOpenTelemetry()
            .ConfigureResource(resource => resource.AddService("forecasthub"))
            .WithMetrics(metrics => metrics
                .AddMeter(ServiceMetrics.MeterName, "Microsoft.AspNetCore.Hosting", "Microsoft.AspNetCore.Server.Kestrel",
                    "Microsoft.AspNetCore.RateLimiting", "System.Runtime")
                .AddPrometheusExporter(exporter =>
                {
                    // Every scrape sees current values; no otel_scope_name label, so series keep their names and labels.
                    exporter.ScrapeResponseCacheDurationMilliseconds = 0;
                    exporter.ScopeInfoEnabled = false;
                }));
        services.ConfigureOpenTelemetryMeterProvider((provider, metrics) =>
        {
            var own = provider.GetRequiredService<IMeterFactory>();
            metrics.AddView(instrument => instrument.Meter.Scope is null || ReferenceEquals(instrument.Meter.Scope, own)
                ? null
                : MetricStreamConfiguration.Drop);
        });
        return services;
    }

    /// <summary><c>GET /metrics</c>: the exporter's endpoint behind the read policy, refreshing the
    /// fleet evaluation first when it is older than <see cref="FleetMaxAge"/>.</summary>
    public static IEndpointConventionBuilder MapMetrics(this IEndpointRouteBuilder routes)
    {
        ArgumentNullException.ThrowIfNull(routes);
        _ = routes.ServiceProvider.GetRequiredService<FleetGauges>();
        return routes.MapPrometheusScrapingEndpoint(Path, meterProvider: null, RefreshFleetFirst, optionsName: null)
            .WithDisplayName("GET /metrics")
            .WithMetadata(new HttpMethodMetadata([HttpMethods.Get]))
            .WithMetadata(new PrivatePortScrape())
            .RequireAuthorization(AuthPolicies.Read);
    }

    public const string Path = "/metrics";

    private static void RefreshFleetFirst(IApplicationBuilder branch) => branch.Use(async (context, next) =>
    {
        var fleet = context.RequestServices.GetRequiredService<FleetHealth>();
        var clock = context.RequestServices.GetRequiredService<TimeProvider>();
        if (fleet.Latest is not { } latest || clock.GetUtcNow() - latest.EvaluatedAt > FleetMaxAge)
        {
            await fleet.ComputeAsync(context.RequestAborted);
        }

        await next(context);
    });
}

/// <summary>Marks the endpoint that <see cref="MetricsOptions.AnonymousPort"/> opens.</summary>
public sealed class PrivatePortScrape;

/// <summary>Lets a read through without a key when it arrives on the configured private port and
/// its endpoint carries <see cref="PrivatePortScrape"/>; the port is the connection's, not the Host header's.</summary>
internal sealed class PrivatePortScrapeHandler(IOptionsMonitor<MetricsOptions> options) : AuthorizationHandler<ReadAccessRequirement>
{
    protected override Task HandleRequirementAsync(AuthorizationHandlerContext context, ReadAccessRequirement requirement)
    {
        var port = options.CurrentValue.AnonymousPort;
        if (port > 0 && context.Resource is HttpContext http && http.Connection.LocalPort == port
            && http.GetEndpoint()?.Metadata.GetMetadata<PrivatePortScrape>() is not null)
        {
            context.Succeed(requirement);
        }
        return Task.CompletedTask;
    }
}
