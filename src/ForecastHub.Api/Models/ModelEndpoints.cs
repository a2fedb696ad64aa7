using ForecastHub.Api.Http;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Observations;
using ForecastHub.Api.OpenApi;
using ForecastHub.Api.Problems;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Sites;
using Microsoft.AspNetCore.Http.HttpResults;

namespace ForecastHub.Api.Models;

/// <summary>The fitted model of a site and a synchronous refit.</summary>
public static class ModelEndpoints
{
    public static RouteGroupBuilder MapModels(this RouteGroupBuilder api)
    {
        ArgumentNullException.ThrowIfNull(api);
        var group = api.MapGroup("/sites/{siteId}/model").WithTags("Models");
        group.MapGet("", GetModel).WithName("GetModel").WithSiteETag().RequireAuthorization(AuthPolicies.Read)
            .WithSummary("The serving model with every diagnostic: fit window, seasonality, AR terms, order selection, ACF, residual tests.");
        group.MapPost("/refit", Refit).WithName("RefitModel").RequireAuthorization(AuthPolicies.Admin)
            .WithSummary("Refits the site now from its stored data and answers the new model.")
            .ProducesProblem(StatusCodes.Status409Conflict)
            .ProducesProblem(StatusCodes.Status422UnprocessableEntity);
        return group;
    }

    /// <param name="unit">Temperature unit of the model's terms that are temperatures: C (default), F or K.</param>
    public static async Task<Results<Ok<ModelResponse>, ProblemHttpResult>> GetModel(
        string siteId,
        [QueryValue(QueryValueKind.Choice, Values = [TemperatureUnits.Celsius, TemperatureUnits.Fahrenheit, TemperatureUnits.Kelvin], Default = TemperatureUnits.Celsius)] string? unit,
        HttpRequest request, ISiteStore sites, ModelService models, IModelStore store, CancellationToken cancellationToken)
    {
        if (RefusedQuery(request, unit) is { } refused)
        {
            return refused;
        }

        var site = await sites.GetAsync(siteId, cancellationToken);
        if (site is null)
        {
            return ApiProblems.NotFound($"There is no site '{siteId}'.");
        }

        var model = await models.GetAsync(site, cancellationToken);
        if (model is null && models.KnownUnreadable(site) is { } unreadable)
        {
            return ApiProblems.NotFound($"Site '{siteId}' has no model this build can serve. {unreadable.Describe()}");
        }

        if (model is null)
        {
            return ApiProblems.NotFound($"Site '{siteId}' has no fitted model yet; it is fitted once it has {models.MinPoints(site)} grid points, or on POST .../model/refit.");
        }

        var attempt = await store.GetLastAttemptAsync(siteId, cancellationToken);
        return TypedResults.Ok(ModelUnits.InUnit(ModelMapping.Describe(site, model, attempt), unit ?? TemperatureUnits.Celsius));
    }

    /// <param name="unit">Temperature unit of the new model's terms that are temperatures: C (default), F or K.</param>
    /// <response code="409">Nothing was fitted: the site has no stored readings, fewer observed grid points than a fit needs (Health:MinHourlyPoints,
    /// default 168, or Health:MinDailyPoints, default 60; the detail gives both counts), or it was deleted or its settings changed while the fit ran.
    /// The serving model, if any, is unchanged.</response>
    /// <response code="422">The fit failed on the site's data (for example every grid value is the same); the detail gives the error. The failure is
    /// recorded as the last attempt and the previous model, if any, keeps serving.</response>
    public static async Task<Results<Ok<ModelResponse>, ProblemHttpResult>> Refit(
        string siteId,
        [QueryValue(QueryValueKind.Choice, Values = [TemperatureUnits.Celsius, TemperatureUnits.Fahrenheit, TemperatureUnits.Kelvin], Default = TemperatureUnits.Celsius)] string? unit,
        HttpRequest request, ISiteStore sites, ModelService models, IModelStore store, CancellationToken cancellationToken)
    {
        // Checked before the fit: a refused request changes nothing.
        if (RefusedQuery(request, unit) is { } refused)
        {
            return refused;
        }

        var site = await sites.GetAsync(siteId, cancellationToken);
        if (site is null)
        {
            return ApiProblems.NotFound($"There is no site '{siteId}'.");
        }

        var (_, outcome) = await models.RefitIfDueAsync(site, force: true, cancellationToken);
        if (outcome is null || outcome.NotEnoughData || outcome.Discarded)
        {
            return ApiProblems.Conflict(outcome?.Error ?? $"Site '{siteId}' has no data to fit.");
        }

        if (!outcome.Succeeded)
        {
            var keeps = outcome.Model is null ? "There is no previous model." : "The previous model keeps serving.";
            return TypedResults.Problem(statusCode: StatusCodes.Status422UnprocessableEntity, title: "Fit failed",
                detail: $"The fit failed on this site's data: {outcome.Error} {keeps}");
        }

        var attempt = await store.GetLastAttemptAsync(siteId, cancellationToken);
        return TypedResults.Ok(ModelUnits.InUnit(ModelMapping.Describe(site, outcome.Model!, attempt), unit ?? TemperatureUnits.Celsius));
    }

    // The model routes read only 'unit'.
    private static ProblemHttpResult? RefusedQuery(HttpRequest request, string? unit)
    {
        ArgumentNullException.ThrowIfNull(request);
        return QueryParameters.RejectUnknown(request, "unit")
            ?? (unit is null || TemperatureUnits.IsKnown(unit) ? null : ApiProblems.BadRequest("unit", TemperatureUnits.UnknownUnitMessage));
    }
}
