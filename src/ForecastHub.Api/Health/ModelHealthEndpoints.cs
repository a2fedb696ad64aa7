using ForecastHub.Api.Auth;
using ForecastHub.Api.Problems;
using ForecastHub.Core.Health;
using Microsoft.AspNetCore.Http.HttpResults;

namespace ForecastHub.Api.Health;

/// <summary>Model health of one site and of the fleet (DESIGN section 6).</summary>
public static class ModelHealthEndpoints
{
    public static RouteGroupBuilder MapModelHealth(this RouteGroupBuilder api)
    {
        ArgumentNullException.ThrowIfNull(api);
        var group = api.MapGroup("").WithTags("Health").RequireAuthorization(AuthPolicies.Read);
        group.MapGet("/sites/{siteId}/health", GetSiteHealth).WithName("GetSiteHealth")
            .WithSummary("The site's model-health state with every reason that applies.");
        group.MapGet("/health/models", GetFleetHealth).WithName("GetFleetHealth")
            .WithSummary("Counts of sites by health state and the sites that need attention, most urgent first.");
        return group;
    }

    public static async Task<Results<Ok<SiteHealthResponse>, ProblemHttpResult>> GetSiteHealth(
        string siteId, ModelHealthService health, CancellationToken cancellationToken)
    {
        var assessment = await health.EvaluateAsync(siteId, cancellationToken);
        return assessment is null
            ? ApiProblems.NotFound($"There is no site '{siteId}'.")
            : TypedResults.Ok(SiteHealthResponse.From(assessment));
    }

    public static async Task<Ok<FleetHealthResponse>> GetFleetHealth(FleetHealth fleet, CancellationToken cancellationToken) =>
        TypedResults.Ok(await fleet.ComputeAsync(cancellationToken));
}

public sealed record HealthReasonResponse(string Code, string Message);

public sealed record SiteHealthResponse(
    string State,
    IReadOnlyList<HealthReasonResponse> Reasons,
    DateTimeOffset? LastObservationAt,
    DateTimeOffset? ModelFittedAt)
{
    public static SiteHealthResponse From(HealthAssessment assessment)
    {
        ArgumentNullException.ThrowIfNull(assessment);
        return new(assessment.State, [.. assessment.Reasons.Select(r => new HealthReasonResponse(r.Code, r.Message))],
            assessment.LastObservationAt, assessment.ModelFittedAt);
    }
}

/// <summary>The fleet summary a scheduler polls; <c>attention</c> is capped and says when it was cut.</summary>
public sealed record FleetHealthResponse(
    DateTimeOffset EvaluatedAt,
    int Sites,
    IReadOnlyDictionary<string, int> Counts,
    IReadOnlyList<AttentionItem> Attention,
    bool AttentionTruncated);

public sealed record AttentionItem(string SiteId, string State, IReadOnlyList<HealthReasonResponse> Reasons);
