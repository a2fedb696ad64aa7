using ForecastHub.Api.Auth;
using ForecastHub.Api.Models;
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
        group.MapGet("/forecast", GetForecast).WithName("GetForecast")
            .WithSummary("The forecast path with prediction intervals, the next local day's summary with threshold probabilities, the model used, and cautions.")
            .ProducesProblem(StatusCodes.Status409Conflict);
        group.MapGet("/forecast.svg", GetForecastChart).WithName("GetForecastChart")
            .WithSummary("A chart of the recent history, the forecast and its 80% and 95% bands, as SVG.")
            .Produces<string>(StatusCodes.Status200OK, "image/svg+xml")
            .ProducesProblem(StatusCodes.Status409Conflict);
        return group;
    }

    /// <param name="steps">Grid steps ahead: 1-240 hourly (default 48), 1-14 daily (default 3).</param>
    /// <param name="levels">Interval levels in percent, comma-separated (default 80,95).</param>
    /// <param name="below">Thresholds in degrees C for the chance that the next local day's minimum drops below each.</param>
    /// <param name="above">Thresholds in degrees C for the chance that the next local day's maximum exceeds each.</param>
    public static async Task<Results<SerializedOk<ForecastResponse>, ProblemHttpResult>> GetForecast(
        string siteId, string? steps, string? levels, string? below, string? above,
        ISiteStore sites, ForecastService forecasts, CancellationToken cancellationToken)
    {
        var site = await sites.GetAsync(siteId, cancellationToken);
        if (site is null)
        {
            return ApiProblems.NotFound($"There is no site '{siteId}'.");
        }

        var (query, field, error) = ForecastQuery.Parse(SiteGridLoader.IsDaily(site), steps, levels, below, above);
        if (query is null)
        {
            return ApiProblems.BadRequest(field!, error!);
        }

        var (json, unavailable) = await forecasts.GetJsonAsync(site, query, cancellationToken);
        return json is { } bytes ? new SerializedOk<ForecastResponse>(bytes) : ApiProblems.Conflict(unavailable!.Detail);
    }

    public static async Task<Results<ContentHttpResult, ProblemHttpResult>> GetForecastChart(
        string siteId, string? steps, ISiteStore sites, ForecastService forecasts, SiteGridLoader grids, TimeProvider clock,
        CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(grids);
        ArgumentNullException.ThrowIfNull(clock);
        var site = await sites.GetAsync(siteId, cancellationToken);
        if (site is null)
        {
            return ApiProblems.NotFound($"There is no site '{siteId}'.");
        }

        var isDaily = SiteGridLoader.IsDaily(site);
        var (query, field, error) = ForecastQuery.Parse(isDaily, steps, "80,95", null, null);
        if (query is null)
        {
            return ApiProblems.BadRequest(field!, error!);
        }

        var (forecast, unavailable) = await forecasts.GetAsync(site, query, cancellationToken);
        if (forecast is null)
        {
            return ApiProblems.Conflict(unavailable!.Detail);
        }

        var now = clock.GetUtcNow();
        var history = await grids.LoadAsync(site, now - (isDaily ? TimeSpan.FromDays(30) : TimeSpan.FromHours(48)), now, cancellationToken);
        var zone = Core.Grid.GridBuilder.FindZone(site.TimeZone);
        var points = history is null
            ? []
            : history.Times.Select((t, i) => new ChartPoint(TimeZoneInfo.ConvertTime(t, zone), history.Values[i]))
                .Where(p => double.IsFinite(p.Value)).ToList();
        var chartSteps = forecast.Steps.Select(s => new ChartStep(TimeZoneInfo.ConvertTime(s.Time, zone), s.Mean,
            s.Intervals.ToDictionary(i => (int)Math.Round(i.Level), i => (i.Lower, i.Upper)))).ToList();
        var title = $"{site.Name}: forecast from {forecast.Origin:yyyy-MM-dd HH:mm} UTC (own history only; official warnings come first)";
        var svg = ForecastChart.Render(title, "°C", points, chartSteps);
        return TypedResults.Content(svg, "image/svg+xml; charset=utf-8");
    }
}
