using System.Data.Common;
using ForecastHub.Api.Hosting;
using Microsoft.AspNetCore.Http.HttpResults;

namespace ForecastHub.Api.Health;

public static class HealthEndpoints
{
    /// <summary>Process and storage probes for orchestrators; no key needed.</summary>
    public static RouteGroupBuilder MapHealth(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/health").WithTags("Health").AllowAnonymous();
        group.MapGet("/live", Live).WithName("Live").WithSummary("The process is up.");
        group.MapGet("/ready", Ready).WithName("Ready")
            .WithSummary("Storage is reachable and every migration of this build is applied.")
            .ProducesProblem(StatusCodes.Status503ServiceUnavailable);
        return group;
    }

    public static Ok<LiveStatus> Live() => TypedResults.Ok(new LiveStatus("live"));

    public static async Task<Results<Ok<ReadyStatus>, ProblemHttpResult>> Ready(IStorageSchema schema, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(schema);
        int version;
        try
        {
            version = await schema.CurrentVersionAsync(cancellationToken);
        }
        catch (Exception e) when (e is DbException or TimeoutException or System.Net.Sockets.SocketException)
        {
            return TypedResults.Problem(statusCode: StatusCodes.Status503ServiceUnavailable, title: "Not ready",
                detail: $"Storage is not reachable ({e.GetType().Name}).");
        }
        if (version < schema.LatestVersion)
        {
            return TypedResults.Problem(statusCode: StatusCodes.Status503ServiceUnavailable, title: "Not ready",
                detail: $"Storage schema is at version {version}; this build needs {schema.LatestVersion}.");
        }
        return TypedResults.Ok(new ReadyStatus("ready", version));
    }
}

public sealed record LiveStatus(string Status);

public sealed record ReadyStatus(string Status, int SchemaVersion);
