using ForecastHub.Core.Modeling;

namespace ForecastHub.Benchmarks;

/// <summary>Next-local-day Monte Carlo summary with 2,000 seeded paths (48-step path, two levels, two thresholds)
/// from an hourly model fitted on a year of data; target at most 2 ms per call.</summary>
internal sealed class NextDayVerb : IBenchmarkVerb
{
    private const double TargetMicroseconds = 2000;

    public string Name => "nextday";

    public string Description => "next-day Monte Carlo summary, 2,000 paths (target <= 2 ms)";

    public int Run(TextWriter output)
    {
        var failed = false;
        foreach (var maxOrder in new[] { 24, 48 })
        {
            var grid = Series.SeasonalHourlyGrid(366 * 24, seed: 7);
            var model = SiteModelFitter.Fit(grid, new ModelSettings { FitWindowDays = 1095, MaxOrder = maxOrder, OrderPolicy = ForecastHub.Core.Selection.OrderPolicy.Aic });
            Threshold[] thresholds = [new(0, ThresholdDirection.Below), new(25, ThresholdDirection.Above)];
            var seed = 0;
            var m = Measure.Run(() => SiteForecaster.Forecast(model, grid, 48, [0.8, 0.95], thresholds, seed++, 2000), batches: 31, callsPerBatch: 20, warmupCalls: 200);
            var pathOnly = Measure.Run(() => SiteForecaster.Forecast(model, grid, 48, [0.8, 0.95], thresholds, 0, paths: 0), batches: 31, callsPerBatch: 20, warmupCalls: 200);
            output.WriteLine($"AR({model.Ar.Order}), calibrated, 2,000 paths: {m.Describe()}");
            output.WriteLine($"AR({model.Ar.Order}), same 48-step forecast without the next-day summary: {pathOnly.Describe()}");
            // What the service computes for a site with two thresholds: the summary plus the night and next24h risk (diagnosis, no target of its own).
            var risk = new ForecastHub.Core.Risk.RiskRequest(
                [new("frost", ThresholdDirection.Below, 0), new("warm", ThresholdDirection.Above, 25)], ForecastHub.Core.Risk.NightHours.Default, grid.Times[^1]);
            var withRisk = Measure.Run(() => SiteForecaster.Forecast(model, grid, 48, [0.8, 0.95], thresholds, seed++, 2000, risk), batches: 31, callsPerBatch: 20, warmupCalls: 200);
            output.WriteLine($"AR({model.Ar.Order}), 2,000 paths, with night and next24h risk for 2 thresholds: {withRisk.Describe()}");
            failed |= m.MedianMicroseconds > TargetMicroseconds;
        }

        return failed ? 1 : 0;
    }
}
