using ForecastHub.Storage.Migrations;
using Microsoft.AspNetCore.Http.HttpResults;
using ForecastHub.Storage;
using Microsoft.Data.Sqlite;

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

    public static Results<Ok<ReadyStatus>, ProblemHttpResult> Ready(MigrationRunner migrations, SqliteDatabase database)
    {
        ArgumentNullException.ThrowIfNull(database);
        if (database.Health.Damage is { } damage)
        {
            return TypedResults.Problem(statusCode: StatusCodes.Status503ServiceUnavailable, title: "Not ready",
                detail: $"Storage is damaged ({damage}); stop the service, run 'ForecastHub.Api check-storage' on the file and restore it from a backup.");
        }
        if (database.Health.IsFull)
        {
            return TypedResults.Problem(statusCode: StatusCodes.Status503ServiceUnavailable, title: "Not ready",
                detail: "Storage is full: the last write failed for lack of space; ready again once a write succeeds.");
        }
        try
        {
            var version = migrations.CurrentVersion();
            if (version < migrations.LatestVersion)
            {
                return TypedResults.Problem(statusCode: StatusCodes.Status503ServiceUnavailable, title: "Not ready",
                    detail: $"Storage schema is at version {version}; this build needs {migrations.LatestVersion}.");
            }
            return TypedResults.Ok(new ReadyStatus("ready", version));
        }
        catch (SqliteException e)
        {
            return TypedResults.Problem(statusCode: StatusCodes.Status503ServiceUnavailable, title: "Not ready",
                detail: $"Storage is not reachable (SQLite error {e.SqliteErrorCode}).");
        }
    }
}

public sealed record LiveStatus(string Status);

public sealed record ReadyStatus(string Status, int SchemaVersion);
