using System.Globalization;
using System.Text.Json;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Forecasts;
using ForecastHub.Api.OpenApi;
using ForecastHub.Api.Problems;
using ForecastHub.Storage.Alerts;
using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.AspNetCore.Mvc;

namespace ForecastHub.Api.Alerts;

/// <summary>A risk raised now, with when it was raised and when its figures last changed.</summary>
public sealed record RaisedAlertResponse(RiskAlert Alert, DateTimeOffset RaisedAt, DateTimeOffset UpdatedAt);

/// <summary>One page of raised risks across the fleet; <c>next</c> links to the following page.</summary>
public sealed record AlertList(IReadOnlyList<RaisedAlertResponse> Alerts, string? Next, IReadOnlyList<string> Cautions);

public static class AlertEndpoints
{
    public const int DefaultPageSize = 100;
    public const int MaxPageSize = 1000;

    /// <summary>The risks raised now, for schedulers that poll instead of receiving webhooks; read scope.</summary>
    public static RouteGroupBuilder MapAlerts(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/alerts").WithTags("Alerts").RequireAuthorization(AuthPolicies.Read);
        group.MapGet("/", List).WithName("ListAlerts")
            .WithSummary("Risks raised now across the fleet (one per site, threshold and window), ordered by site, one page at a time.")
            .ProducesProblem(StatusCodes.Status400BadRequest);
        return group;
    }

    /// <param name="after">Where the page starts: the cursor from the previous page's <c>next</c> link; absent for the first page.</param>
    /// <param name="limit">Most items on this page.</param>
    public static async Task<Results<Ok<AlertList>, ProblemHttpResult>> List(
        IAlertStore alerts, [FromQuery] string? after, [FromQuery, QueryValue(QueryValueKind.WholeNumber, Minimum = 1, Maximum = MaxPageSize, Default = DefaultPageSize)] string? limit, CancellationToken cancellationToken)
    {
        var pageSize = DefaultPageSize;
        if (limit is not null && (!int.TryParse(limit, NumberStyles.None, CultureInfo.InvariantCulture, out pageSize) || pageSize is < 1 or > MaxPageSize))
        {
            return ApiProblems.BadRequest("limit", $"limit must be a whole number from 1 to {MaxPageSize}.");
        }
        (string, string, string)? cursor = null;
        if (after is not null)
        {
            var parts = after.Split('/');
            if (parts.Length != 3)
            {
                return ApiProblems.BadRequest("after", "after must be the cursor from a previous page's 'next' link (site/threshold/window).");
            }
            cursor = (parts[0], parts[1], parts[2]);
        }
        var page = await alerts.ListRaisedAsync(cursor, pageSize + 1, cancellationToken).ConfigureAwait(false);
        var shown = page.Take(pageSize).ToList();
        var next = page.Count > pageSize
            ? $"/api/v1/alerts?after={Uri.EscapeDataString($"{shown[^1].SiteId}/{shown[^1].ThresholdId}/{shown[^1].WindowName}")}&limit={pageSize}"
            : null;
        var items = shown.Select(a => new RaisedAlertResponse(JsonSerializer.Deserialize<RiskAlert>(a.DetailJson, AlertEvents.Json)!, a.RaisedAt, a.UpdatedAt)).ToList();
        return TypedResults.Ok(new AlertList(items, next, ForecastCautions.All));
    }
}
