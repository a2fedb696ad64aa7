using ForecastHub.Core.Forecasting;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Risk;
using ForecastHub.Core.Series;

namespace ForecastHub.Core.Modeling;

/// <summary>
/// Forecasts from the newest data in <paramref name="recent"/>, even when the model is older.
/// When the newest grid steps are missing, the forecast starts from the last step with a value and
/// counts horizons from there (so intervals widen), and reports the missing steps. Steps returned
/// are the <c>steps</c> grid steps after the grid's last step. Hourly sites also get the next local
/// day's summary from seeded Monte Carlo paths (paths = 0 skips it). docs/numerics.md.
/// Input rules: null throws ArgumentNullException; steps below 1, negative paths and levels outside (0, 1)
/// ArgumentOutOfRangeException; a grid of another cadence or zone ArgumentException; a grid with no
/// value SeriesException(Empty); an infinite value SeriesException(NonFinite). History steps that are
/// missing (NaN) or before the grid start count as the anomaly's mean.
/// </summary>
public static class SiteForecaster
{
    public const int DefaultPaths = 2000;

    /// <summary>Hourly forecasts condition on this much recent data (enough for any AR order the settings allow).</summary>
    public static readonly TimeSpan HourlyRecentWindow = TimeSpan.FromDays(10);

    /// <summary>Daily forecasts condition on this much recent data.</summary>
    public static readonly TimeSpan DailyRecentWindow = TimeSpan.FromDays(120);

    /// <summary>How much data before its origin a forecast of this cadence conditions on.</summary>
    public static TimeSpan RecentWindow(GridCadence cadence) => cadence == GridCadence.Daily ? DailyRecentWindow : HourlyRecentWindow;

    /// <summary>Missing steps walked at most: beyond them the AR state is forgotten (its psi-weights have died
    /// away), so the walk starts this many steps before the end from the anomaly mean, at the full spread.</summary>
    public const int MaxWalkedSteps = 1000;

    public static SiteForecast Forecast(
        SiteModel model,
        TimeGrid recent,
        int steps,
        IReadOnlyList<double> levels,
        IReadOnlyList<Threshold> thresholds,
        int seed,
        int paths = DefaultPaths,
        RiskRequest? risk = null)
    {
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(recent);
        ArgumentNullException.ThrowIfNull(levels);
        ArgumentNullException.ThrowIfNull(thresholds);
        ArgumentOutOfRangeException.ThrowIfLessThan(steps, 1);
        ArgumentOutOfRangeException.ThrowIfNegative(paths);
        foreach (var level in levels)
        {
            GaussianInterval.Multiplier(level);
        }

        if (recent.Cadence != model.Cadence || recent.TimeZone != model.TimeZone)
        {
            throw new ArgumentException("The grid's cadence or time zone differs from the model's.", nameof(recent));
        }

        var last = recent.LastValueIndex;
        if (last < 0)
        {
            throw new SeriesException(SeriesProblem.Empty, "The grid has no value to forecast from.");
        }

        var zone = GridBuilder.FindZone(model.TimeZone);
        var missing = recent.Count - 1 - last;
        var walked = Math.Min(missing, MaxWalkedSteps);
        var start = last + missing - walked; // the step the walk starts from: the last value, or a forgotten state
        var horizons = walked + steps;
        NextDayPlan? plan = model.Cadence == GridCadence.Hourly && paths > 0 ? PlanNextDay(recent, start, zone) : null;
        var total = Math.Max(horizons, plan?.Last ?? 0);
        if (risk is not null)
        {
            total = Math.Max(total, RiskWindows.HorizonsNeeded(model.Cadence, recent.Times[last], risk.Now));
        }

        var ar = model.Ar;
        var anomalies = new double[start + 1];
        Array.Fill(anomalies, double.NaN);
        if (start == last)
        {
            var historyTimes = recent.Times.AsSpan(Math.Max(0, last - ar.Order + 1), Math.Min(ar.Order, last + 1)).ToArray();
            var historyClimatology = model.Climatology.Mean(historyTimes);
            for (var i = 0; i < historyTimes.Length; i++)
            {
                var t = last - historyTimes.Length + 1 + i;
                if (double.IsInfinity(recent.Values[t]))
                {
                    throw new SeriesException(SeriesProblem.NonFinite, $"Grid value at {recent.Times[t]:O} is not finite.");
                }

                anomalies[t] = recent.Values[t] - historyClimatology[i];
            }
        }

        var history = AnomalyPath.History(ar, anomalies, start);
        var times = GridClock.Following(model.Cadence, zone, recent.Times[start], total);
        var climatology = model.Climatology.Mean(times);
        var g = model.VarianceSeason.Factors(times);
        var psi = ArForecast.PsiWeights(ar.Coefficients, total);
        var mean = new double[total];
        var sd = new double[total];
        AnomalyPath.Compute(ar, history, psi, g, mean, sd);
        for (var k = 0; k < total; k++)
        {
            mean[k] += climatology[k];
        }

        var table = model.Settings.IntervalMethod == IntervalMethod.Calibrated ? model.Calibration : null;
        var notes = new List<string>();
        if (model.Settings.IntervalMethod == IntervalMethod.Calibrated && table is null)
        {
            notes.Add("The model has no calibration table; Gaussian intervals are used.");
        }

        if (missing > 0)
        {
            notes.Add($"The newest {missing} grid step(s) are missing; the forecast starts from {recent.Times[last]:O} and its intervals are wider.");
        }

        if (start > last)
        {
            notes.Add($"The data end more than {MaxWalkedSteps} steps ago, beyond the model's memory: the forecast is the climatology with the anomaly's full spread.");
        }

        var result = new ForecastStep[steps];
        for (var s = 0; s < steps; s++)
        {
            var k = walked + s;
            var intervals = levels.Select(level => table is null
                ? GaussianInterval.Of(mean[k], sd[k], level)
                : Calibration.Interval(table, k + 1, mean[k], sd[k], level)).ToArray();
            result[s] = new ForecastStep(times[k], k + 1, mean[k], sd[k], intervals)
            {
                Probabilities = risk is null ? [] : StepProbabilities(PredictiveDistribution.Of(mean[k], sd[k], table, k + 1), risk.Thresholds),
            };
        }

        var windows = risk is null || paths == 0 || risk.Thresholds.Count == 0 ? [] : RiskWindows.Plan(model.Cadence, zone, risk.Night, risk.Now, times);
        var simulated = Math.Max(plan?.Last ?? 0, windows.Count == 0 ? 0 : windows.Max(w => w.LastHorizon));
        using var sample = simulated > 0 ? SamplePaths.Simulate(ar, g, simulated, paths, seed) : null;
        var nextDay = plan is { } p ? Summarise(table, p, sample!, mean, levels, thresholds, seed) : null;
        var risks = windows.Count == 0 ? [] : AssessRisk(model, table, risk!, windows, times, mean, sd, sample!, levels);
        return new SiteForecast(recent.Times[last], missing, table is null ? IntervalMethod.Gaussian : IntervalMethod.Calibrated, result, nextDay, notes)
        {
            Risk = risks,
        };
    }

    private static StepProbability[] StepProbabilities(PredictiveDistribution distribution, IReadOnlyList<RiskThreshold> thresholds) =>
        [.. thresholds.Select(t => new StepProbability(t.Id, t.ValueC, t.Direction, distribution.Probability(t.Direction, t.ValueC)))];

    private static IReadOnlyList<WindowRisk> AssessRisk(SiteModel model, CalibrationTable? table, RiskRequest risk, IReadOnlyList<WindowPlan> windows,
        DateTimeOffset[] times, double[] mean, double[] sd, SamplePaths sample, IReadOnlyList<double> levels)
    {
        var horizons = windows.Max(w => w.LastHorizon);
        var distributions = Enumerable.Range(0, horizons).Select(k => PredictiveDistribution.Of(mean[k], sd[k], table, k + 1)).ToArray();
        var stepHours = model.Cadence == GridCadence.Hourly ? 1.0 : 0.0;
        return RiskWindows.Assess(distributions, times, stepHours, sample, windows, risk.Thresholds, levels);
    }

    private sealed record NextDayPlan(DateOnly Date, DateTimeOffset From, DateTimeOffset To, int First, int Last);

    /// <summary>The local day after the one holding the grid's last step; First/Last are 1-based horizons from the newest value.</summary>
    private static NextDayPlan PlanNextDay(TimeGrid recent, int last, TimeZoneInfo zone)
    {
        var date = GridBuilder.LocalDate(recent.Times[^1], zone).AddDays(1);
        var from = GridBuilder.LocalDayStart(date, zone);
        var to = GridBuilder.LocalDayStart(date.AddDays(1), zone);
        var lastValue = recent.Times[last];
        var first = (int)Math.Round((from - lastValue).TotalHours);
        var end = (int)Math.Round((to - lastValue).TotalHours);
        return new NextDayPlan(date, from, to, first, end - 1);
    }

    private static NextDaySummary Summarise(CalibrationTable? table, NextDayPlan plan, SamplePaths sample, double[] mean, IReadOnlyList<double> levels, IReadOnlyList<Threshold> thresholds, int seed)
    {
        // Widen the simulated innovations by the calibration's 80% spread ratio over the day's horizons.
        var inflation = 1.0;
        if (table is not null)
        {
            var z80 = GaussianInterval.Multiplier(0.8);
            inflation = Enumerable.Range(plan.First, plan.Last - plan.First + 1)
                .Average(h => (Calibration.Interval(table, h, 0, 1, 0.8).Upper - Calibration.Interval(table, h, 0, 1, 0.8).Lower) / (2 * z80));
        }

        var paths = sample.Count;
        var (min, max, dayMean) = NextDaySimulation.Run(sample, mean, inflation, plan.First, plan.Last);
        var probabilities = thresholds.Select(t => new ThresholdProbability(
            t.Value,
            t.Direction,
            t.Direction == ThresholdDirection.Below ? min.Count(v => v < t.Value) / (double)paths : max.Count(v => v > t.Value) / (double)paths)).ToArray();
        return new NextDaySummary(plan.Date, plan.From, plan.To, DistributionSummary.OfSample(min, levels), DistributionSummary.OfSample(max, levels), DistributionSummary.OfSample(dayMean, levels), probabilities, paths, seed);
    }
}
