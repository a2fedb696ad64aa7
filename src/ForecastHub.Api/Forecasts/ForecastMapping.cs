using ForecastHub.Core.Forecasting;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Risk;
using ForecastHub.Core.Settings;

namespace ForecastHub.Api.Forecasts;

/// <summary>A forecast from the core, mapped to the HTTP contract (levels in percent).</summary>
public sealed record ForecastPath(DateTimeOffset LastData, int MissingSteps, string IntervalMethod, IReadOnlyList<ForecastStepResponse> Steps,
    NextDaySummaryResponse? NextDay, IReadOnlyList<RiskResponse> Risk);

/// <summary>Calls the core's forecaster and maps its records to the field names of DESIGN sections 5 and 10.</summary>
public static class ForecastMapping
{
    /// <summary>Forecasts <paramref name="steps"/> grid steps after the last step of <paramref name="recent"/>; levels in percent, thresholds in degrees C.</summary>
    /// <param name="risk">The site's thresholds and night; query thresholds are added after the site's, and windows start from <paramref name="now"/>.</param>
    public static ForecastPath Forecast(SiteModel model, TimeGrid recent, int steps, IReadOnlyList<double> levels,
        IReadOnlyList<double> below, IReadOnlyList<double> above, int seed, SiteRiskSettings? risk = null, DateTimeOffset? now = null)
    {
        ArgumentNullException.ThrowIfNull(recent);
        ArgumentNullException.ThrowIfNull(levels);
        ArgumentNullException.ThrowIfNull(below);
        ArgumentNullException.ThrowIfNull(above);
        var fractions = levels.Select(l => l / 100).ToArray();
        var thresholds = below.Select(v => new Threshold(v, ThresholdDirection.Below))
            .Concat(above.Select(v => new Threshold(v, ThresholdDirection.Above))).ToArray();
        var settings = risk ?? SiteRiskSettings.Default;
        var request = new RiskRequest(settings.WithQueryThresholds(below, above), settings.Night, now ?? recent.Times[^1]);
        var forecast = SiteForecaster.Forecast(model, recent, steps, fractions, thresholds, seed, risk: request);
        var path = forecast.Steps.Select(s => new ForecastStepResponse(s.Time, s.Mean, s.Sd, Intervals(s.Intervals),
            [.. s.Probabilities.Select(p => new StepProbabilityResponse(p.Id, p.Threshold, WireNames.ThresholdDirections.Of(p.Direction), p.Probability))])).ToArray();
        var alertLevels = settings.Thresholds.ToDictionary(t => t.Id, t => t.AlertProbability, StringComparer.Ordinal);
        var risks = forecast.Risk.Select(r => new RiskResponse(
            r.Threshold.Id,
            r.Threshold.ValueC,
            WireNames.ThresholdDirections.Of(r.Threshold.Direction),
            r.Threshold.Id is { } id ? alertLevels.GetValueOrDefault(id) : null,
            new RiskWindowResponse(r.Window.Name, r.Window.From, r.Window.To),
            r.Probability,
            r.FirstCrossing is { } c ? new CrossingResponse(c.Median, c.P10, c.P90) : null,
            r.ExpectedHoursBeyond,
            Summary(r.Extreme))).ToArray();
        var nextDay = forecast.NextDay is { } day
            ? new NextDaySummaryResponse(day.Date, Summary(day.Min), Summary(day.Max), Summary(day.Mean),
                [.. day.Probabilities.Select(p => new ThresholdProbabilityResponse(p.Threshold, WireNames.ThresholdDirections.Of(p.Direction), p.Probability))])
            : null;
        return new ForecastPath(forecast.LastData, forecast.MissingSteps, WireNames.IntervalMethods.Of(forecast.IntervalMethod), path, nextDay, risks);
    }

    private static ForecastInterval[] Intervals(IEnumerable<PredictionInterval> intervals) =>
        [.. intervals.Select(i => new ForecastInterval(Math.Round(i.Level * 100, 6), i.Lower, i.Upper))];

    private static DaySummaryValue Summary(DistributionSummary summary) => new(summary.Mean, Intervals(summary.Intervals));
}
