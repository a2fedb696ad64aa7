using ForecastHub.Api.Http;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Models;
using ForecastHub.Api.Observations;
using ForecastHub.Api.OpenApi;
using ForecastHub.Api.Problems;
using ForecastHub.Storage.Sites;
using Microsoft.AspNetCore.Http.HttpResults;

namespace ForecastHub.Api.Forecasts;

/// <summary>Forecast answers (JSON and chart) from the serving model and the latest data.</summary>
public static class ForecastEndpoints
{
    public static RouteGroupBuilder MapForecasts(this RouteGroupBuilder api)
    {
        ArgumentNullException.ThrowIfNull(api);
        var group = api.MapGroup("/sites/{siteId}").WithTags("Forecasts").RequireAuthorization(AuthPolicies.Read);
        group.MapGet("/forecast", GetForecast).WithName("GetForecast").WithSiteETag()
            .WithSummary("The forecast path with prediction intervals, the next local day's summary with threshold probabilities, the model used, and cautions.")
            .ProducesProblem(StatusCodes.Status409Conflict)
            .WithSuccessFormats(csv: true);
        group.MapGet("/forecast.svg", GetForecastChart).WithName("GetForecastChart").WithSiteETag()
            .WithSummary("A chart of the recent history, the forecast and its 80% and 95% bands, as SVG.")
            .Produces<string>(StatusCodes.Status200OK, "image/svg+xml")
            .ProducesProblem(StatusCodes.Status409Conflict);
        return group;
    }

    /// <param name="steps">Grid steps ahead: 1-240 hourly (default 48), 1-14 daily (default 3).</param>
    /// <param name="levels">Interval levels in percent, comma-separated (default 80,95).</param>
    /// <param name="below">Thresholds, in the answer's unit, for the chance that the next local day's minimum drops below each.</param>
    /// <param name="above">Thresholds, in the answer's unit, for the chance that the next local day's maximum exceeds each.</param>
    /// <param name="unit">Temperature unit of the answer and of the thresholds: C (default), F or K.</param>
    /// <param name="format">json (default) or csv; <c>Accept: text/csv</c> also asks for CSV.</param>
    /// <response code="409">No forecast yet: the site has no fitted model (it is warming up with fewer observed grid points than a fit needs, its fit failed,
    /// or its stored model is of another build and is being refitted), or it has no stored readings to start from. The detail names the health state and its reasons.</response>
    public static async Task<Results<SerializedOk<ForecastResponse>, Ok<ForecastResponse>, ContentHttpResult, ProblemHttpResult>> GetForecast(
        string siteId,
        [QueryValue(QueryValueKind.WholeNumber, Minimum = 1, Maximum = ForecastQuery.MaxHourlySteps)] string? steps,
        [QueryValue(QueryValueKind.NumberList, Minimum = 0, Maximum = 100, ExclusiveBounds = true, MaxItems = ForecastQuery.MaxLevels, Default = "80,95")] string? levels,
        [QueryValue(QueryValueKind.NumberList, MaxItems = ForecastQuery.MaxThresholds)] string? below,
        [QueryValue(QueryValueKind.NumberList, MaxItems = ForecastQuery.MaxThresholds)] string? above,
        [QueryValue(QueryValueKind.Choice, Values = [TemperatureUnits.Celsius, TemperatureUnits.Fahrenheit, TemperatureUnits.Kelvin], Default = TemperatureUnits.Celsius)] string? unit,
        [QueryValue(QueryValueKind.Choice, Values = ["json", "csv"], Default = "json")] string? format,
        HttpRequest request, ISiteStore sites, ForecastService forecasts, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        if (QueryParameters.RejectUnknown(request, "steps", "levels", "below", "above", "unit", "format") is { } unknown)
        {
            return unknown;
        }

        var site = await sites.GetAsync(siteId, cancellationToken);
        if (site is null)
        {
            return ApiProblems.NotFound($"There is no site '{siteId}'.");
        }

        var answerUnit = unit ?? TemperatureUnits.Celsius;
        if (!TemperatureUnits.IsKnown(answerUnit))
        {
            return ApiProblems.BadRequest("unit", TemperatureUnits.UnknownUnitMessage);
        }

        if (format is not (null or "json" or "csv"))
        {
            return ApiProblems.BadRequest("format", "format must be 'json' or 'csv'.");
        }

        var (query, field, error) = ForecastQuery.Parse(site.IsDaily, steps, levels, below, above, answerUnit);
        if (query is null)
        {
            return ApiProblems.BadRequest(field!, error!);
        }

        var csv = format == "csv" || (format is null && PrefersCsv(request));
        if (!csv && answerUnit == TemperatureUnits.Celsius)
        {
            var (json, missing) = await forecasts.GetJsonAsync(site, query, cancellationToken);
            return json is { } bytes ? new SerializedOk<ForecastResponse>(bytes) : ApiProblems.Conflict(missing!.Detail);
        }

        var (forecast, unavailable) = await forecasts.GetAsync(site, query, cancellationToken);
        if (forecast is null)
        {
            return ApiProblems.Conflict(unavailable!.Detail);
        }

        var answer = ForecastUnits.InUnit(forecast, answerUnit);
        if (!csv)
        {
            return TypedResults.Ok(answer);
        }

        request.HttpContext.Response.Headers["Temperature-Unit"] = answerUnit;
        double InUnit(double c) => Math.Round(TemperatureUnits.FromCelsius(c, answerUnit), 9);
        return TypedResults.Content(ForecastCsv.Write(answer, [.. query.Below.Select(InUnit)], [.. query.Above.Select(InUnit)]), ForecastCsv.ContentType);
    }

    // CSV when the Accept header ranks text/csv above application/json (or lists only text/csv).
    private static bool PrefersCsv(HttpRequest request)
    {
        var accepted = request.GetTypedHeaders().Accept;
        double Quality(string type) => accepted.Where(a => a.MediaType.Equals(type, StringComparison.OrdinalIgnoreCase))
            .Select(a => a.Quality ?? 1).DefaultIfEmpty(-1).Max();
        var csv = Quality("text/csv");
        return csv > 0 && csv > Quality("application/json");
    }

    /// <param name="steps">Grid steps ahead: 1-240 hourly (default 48), 1-14 daily (default 3).</param>
    /// <param name="unit">Temperature unit of the axis: C (default), F or K.</param>
    /// <response code="409">No forecast yet: the site has no fitted model (it is warming up with fewer observed grid points than a fit needs, its fit failed,
    /// or its stored model is of another build and is being refitted), or it has no stored readings to start from. The detail names the health state and its reasons.</response>
    public static async Task<Results<ContentHttpResult, ProblemHttpResult>> GetForecastChart(
        string siteId, [QueryValue(QueryValueKind.WholeNumber, Minimum = 1, Maximum = ForecastQuery.MaxHourlySteps)] string? steps,
        [QueryValue(QueryValueKind.Choice, Values = [TemperatureUnits.Celsius, TemperatureUnits.Fahrenheit, TemperatureUnits.Kelvin], Default = TemperatureUnits.Celsius)] string? unit, HttpRequest request, ISiteStore sites, ForecastService forecasts, SiteGridLoader grids,
        TimeProvider clock, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(grids);
        ArgumentNullException.ThrowIfNull(clock);
        ArgumentNullException.ThrowIfNull(request);
        if (QueryParameters.RejectUnknown(request, "steps", "unit") is { } unknown)
        {
            return unknown;
        }

        var site = await sites.GetAsync(siteId, cancellationToken);
        if (site is null)
        {
            return ApiProblems.NotFound($"There is no site '{siteId}'.");
        }

        var axisUnit = unit ?? TemperatureUnits.Celsius;
        if (!TemperatureUnits.IsKnown(axisUnit))
        {
            return ApiProblems.BadRequest("unit", TemperatureUnits.UnknownUnitMessage);
        }

        var isDaily = site.IsDaily;
        var (query, field, error) = ForecastQuery.Parse(isDaily, steps, "80,95", null, null);
        if (query is null)
        {
            return ApiProblems.BadRequest(field!, error!);
        }

        var (computed, unavailable) = await forecasts.GetAsync(site, query, cancellationToken);
        if (computed is null)
        {
            return ApiProblems.Conflict(unavailable!.Detail);
        }

        var forecast = ForecastUnits.InUnit(computed, axisUnit);
        var now = clock.GetUtcNow();
        var history = await grids.LoadAsync(site, now - (isDaily ? TimeSpan.FromDays(30) : TimeSpan.FromHours(48)), now, cancellationToken);
        var zone = Core.Grid.GridBuilder.FindZone(site.TimeZone);
        var points = history is null
            ? []
            : history.Times.Select((t, i) => new ChartPoint(TimeZoneInfo.ConvertTime(t, zone), TemperatureUnits.FromCelsius(history.Values[i], axisUnit)))
                .Where(p => double.IsFinite(p.Value)).ToList();
        var chartSteps = forecast.Steps.Select(s => new ChartStep(TimeZoneInfo.ConvertTime(s.Time, zone), s.Mean,
            s.Intervals.ToDictionary(i => (int)Math.Round(i.Level), i => (i.Lower, i.Upper)))).ToList();
        var svg = ForecastChart.Render(ForecastChart.Title(site.Name, forecast.Origin), axisUnit == TemperatureUnits.Kelvin ? "K" : "°" + axisUnit, points, chartSteps);
        return TypedResults.Content(svg, "image/svg+xml; charset=utf-8");
    }
}
