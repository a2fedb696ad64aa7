using System.Data.Common;
using ForecastHub.Api.Hosting;
using ForecastHub.Api.Mqtt;
using Microsoft.AspNetCore.Http.HttpResults;
using ForecastHub.Storage;

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

    public static async Task<Results<Ok<ReadyStatus>, ProblemHttpResult>> Ready(IStorageSchema schema, MqttSubscriptionState mqtt, HttpContext context, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(schema);
        ArgumentNullException.ThrowIfNull(mqtt);
        ArgumentNullException.ThrowIfNull(context);
        // What SQLite reported to the requests (the PostgreSQL provider has no such file to damage).
        if (!context.RequestServices.GetRequiredService<Microsoft.Extensions.Options.IOptions<StorageOptions>>().Value.IsPostgres
            && context.RequestServices.GetRequiredService<SqliteDatabase>().Health is { } health)
        {
            if (health.Damage is { } damage)
            {
                return TypedResults.Problem(statusCode: StatusCodes.Status503ServiceUnavailable, title: "Not ready",
                    detail: $"Storage is damaged ({damage}); stop the service, run 'ForecastHub.Api check-storage' on the file and restore it from a backup.");
            }
            if (health.IsFull)
            {
                return TypedResults.Problem(statusCode: StatusCodes.Status503ServiceUnavailable, title: "Not ready",
                    detail: "Storage is full: the last write failed for lack of space; ready again once a write succeeds.");
            }
        }
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
        // The MQTT subscription is reported, never a reason to be unready: HTTP ingest works without it.
        return TypedResults.Ok(new ReadyStatus("ready", version, new MqttStatus(mqtt.State, mqtt.Since, mqtt.LastError)));
    }
}

public sealed record LiveStatus(string Status);

public sealed record ReadyStatus(string Status, int SchemaVersion, MqttStatus Mqtt);

/// <summary>The MQTT subscription: <c>off</c> (no Mqtt:Server), <c>connecting</c>, <c>connected</c> or <c>reconnecting</c>.</summary>
public sealed record MqttStatus(string State, DateTimeOffset? Since, string? LastError);
