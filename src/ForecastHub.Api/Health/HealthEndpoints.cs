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

    public static async Task<Results<Ok<ReadyStatus>, ProblemHttpResult>> Ready(IStorageSchema schema, MqttSubscriptionState mqtt, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(schema);
        ArgumentNullException.ThrowIfNull(mqtt);
        var readiness = await schema.CheckReadinessAsync(cancellationToken);
        // The MQTT subscription is reported, never a reason to be unready: HTTP ingest works without it.
        return readiness.Ready
            ? TypedResults.Ok(new ReadyStatus("ready", readiness.SchemaVersion, new MqttStatus(mqtt.State, mqtt.Since, mqtt.LastError)))
            : TypedResults.Problem(statusCode: StatusCodes.Status503ServiceUnavailable, title: "Not ready", detail: readiness.Problem);
    }
}

public sealed record LiveStatus(string Status);

public sealed record ReadyStatus(string Status, int SchemaVersion, MqttStatus Mqtt);

/// <summary>The MQTT subscription: <c>off</c> (no Mqtt:Server), <c>connecting</c>, <c>connected</c> or <c>reconnecting</c>.</summary>
public sealed record MqttStatus(string State, DateTimeOffset? Since, string? LastError);
