using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Series;

namespace ForecastHub.Core.Verification;

/// <summary>Rolling-origin backtest settings. Origins are grid steps with an observed value whose next step
/// is at or after <see cref="TestFrom"/>, every <see cref="OriginEverySteps"/> steps, thinned evenly to at
/// most <see cref="MaxOrigins"/>; the model is refitted on the data up to the origin whenever the last fit
/// is <see cref="RefitEveryDays"/> or more days old, at most <see cref="MaxRefits"/> times (bounded cost).</summary>
public sealed record BacktestOptions
{
    public required DateTimeOffset TestFrom { get; init; }

    public DateTimeOffset? TestTo { get; init; }

    public int RefitEveryDays { get; init; } = 7;

    /// <summary>Horizons scored; default the next day: 24 hourly steps, or 1 daily step.</summary>
    public int? Steps { get; init; }

    /// <summary>Default one origin a day: 24 hourly steps, or 1 daily step.</summary>
    public int? OriginEverySteps { get; init; }

    public IReadOnlyList<double> Levels { get; init; } = [0.8, 0.95];

    public int MaxOrigins { get; init; } = 1000;

    public int MaxRefits { get; init; } = 400;
}

public sealed record BacktestResult(
    int Origins,
    int Refits,
    DateTimeOffset? From,
    DateTimeOffset? To,
    IReadOnlyList<HorizonScores> Horizons,
    IReadOnlyList<double> PooledCoverage);

/// <summary>
/// Rolling-origin backtest: from each origin, the model fitted on data up to it forecasts the next
/// steps, scored against what the grid observed (interpolated steps are not scored). References:
/// persistence (hourly: the same hour on the last observed day, y_{t-24 ceil(h/24)}; daily: the
/// origin's value) and the model's climatology. Input rules: null throws ArgumentNullException;
/// bad options ArgumentOutOfRangeException; a grid with no origin in the test span gives a result
/// with 0 origins (scores NaN); origins whose fit fails (too short, constant) are skipped.
/// </summary>
public static class Backtest
{
    public static BacktestResult Run(TimeGrid grid, ModelSettings settings, BacktestOptions options)
    {
        ArgumentNullException.ThrowIfNull(grid);
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(options);
        ArgumentOutOfRangeException.ThrowIfLessThan(options.RefitEveryDays, 0);
        ArgumentOutOfRangeException.ThrowIfLessThan(options.MaxOrigins, 1);
        var hourly = grid.Cadence == GridCadence.Hourly;
        var steps = options.Steps ?? (hourly ? 24 : 1);
        var every = options.OriginEverySteps ?? (hourly ? 24 : 1);
        ArgumentOutOfRangeException.ThrowIfLessThan(steps, 1);
        ArgumentOutOfRangeException.ThrowIfLessThan(every, 1);

        var candidates = new List<int>();
        for (var o = 0; o + 1 < grid.Count; o++)
        {
            if (grid.Times[o + 1] >= options.TestFrom && (options.TestTo is null || grid.Times[o + 1] < options.TestTo)
                && !double.IsNaN(grid.Values[o]) && !grid.Interpolated[o]
                && (candidates.Count == 0 || o - candidates[^1] >= every))
            {
                candidates.Add(o);
            }
        }

        var stride = Math.Max(1, (int)Math.Ceiling(candidates.Count / (double)options.MaxOrigins));
        var origins = candidates.Where((_, i) => i % stride == 0).ToArray();
        var scores = new ScoreAccumulator(steps, options.Levels);
        var lower = new double[options.Levels.Count];
        var upper = new double[options.Levels.Count];
        SiteModel? model = null;
        DateTimeOffset fittedAt = default;
        var refits = 0;
        var used = 0;
        foreach (var o in origins)
        {
            var known = grid.Until(o);
            if ((model is null || (grid.Times[o] - fittedAt).TotalHours >= 24 * options.RefitEveryDays - 2) && refits < options.MaxRefits)
            {
                try
                {
                    model = SiteModelFitter.Fit(known, settings);
                    fittedAt = grid.Times[o];
                    refits++;
                }
                catch (SeriesException)
                {
                    model = null;
                }
            }

            if (model is null)
            {
                continue;
            }

            used++;
            var forecast = SiteForecaster.Forecast(model, known, steps, options.Levels, [], seed: 0, paths: 0);
            var targetTimes = forecast.Steps.Select(s => s.Time).ToArray();
            var climatology = model.Climatology.Mean(targetTimes);
            for (var h = 1; h <= steps && o + h < grid.Count; h++)
            {
                var t = o + h;
                if (grid.Interpolated[t])
                {
                    continue;
                }

                var step = forecast.Steps[h - 1];
                for (var l = 0; l < lower.Length; l++)
                {
                    (lower[l], upper[l]) = (step.Intervals[l].Lower, step.Intervals[l].Upper);
                }

                var persistence = hourly ? ValueAt(grid, t - 24 * (int)Math.Ceiling(h / 24.0)) : grid.Values[o];
                scores.Add(h, grid.Values[t], step.Mean, step.Sd, lower, upper, persistence, climatology[h - 1]);
            }
        }

        return new BacktestResult(
            used,
            refits,
            origins.Length > 0 ? grid.Times[origins[0]] : null,
            origins.Length > 0 ? grid.Times[origins[^1]] : null,
            scores.Result(),
            scores.PooledCoverage());
    }

    private static double ValueAt(TimeGrid grid, int index) => index >= 0 ? grid.Values[index] : double.NaN;
}
