using ForecastHub.Api.Auth;
using ForecastHub.Api.Health;

namespace ForecastHub.Api.Metrics;

public static class MetricsEndpoints
{
    /// <summary>Sites-per-state counts older than this are recomputed before a scrape is answered.</summary>
    public static readonly TimeSpan FleetMaxAge = TimeSpan.FromMinutes(1);

    public static RouteHandlerBuilder MapMetrics(this IEndpointRouteBuilder routes)
    {
        ArgumentNullException.ThrowIfNull(routes);
        return routes.MapGet("/metrics", GetMetrics).WithName("GetMetrics").WithTags("Metrics")
            .WithSummary("Service metrics in Prometheus text format 0.0.4.")
            .Produces<string>(StatusCodes.Status200OK, "text/plain")
            .RequireAuthorization(AuthPolicies.Read);
    }

    public static async Task<IResult> GetMetrics(ServiceMetrics metrics, FleetHealth fleet, TimeProvider clock, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(metrics);
        ArgumentNullException.ThrowIfNull(fleet);
        ArgumentNullException.ThrowIfNull(clock);
        if (fleet.Latest is not { } latest || clock.GetUtcNow() - latest.EvaluatedAt > FleetMaxAge)
        {
            await fleet.ComputeAsync(cancellationToken);
        }

        return TypedResults.Text(metrics.Registry.Render(), "text/plain; version=0.0.4; charset=utf-8");
    }
}
