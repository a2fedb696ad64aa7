using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Risk;

namespace ForecastHub.Core.Verification;

/// <summary>Backtest settings: origins at the start of each of the last <see cref="Days"/> local days up to
/// the day of <see cref="DataEnd"/>; the model is refitted on the data before the origin at the first
/// origin and then every <see cref="RefitEveryDays"/> days.</summary>
public sealed record BacktestOptions
{
    /// <summary>The newest data: its local day holds the last origin, and the grid ends with its step.</summary>
    public required DateTimeOffset DataEnd { get; init; }

    public required int Days { get; init; }

    /// <summary>The refit interval when none is given; also how far a service refit may carry a calibration table.</summary>
    public const int DefaultRefitEveryDays = 7;

    public int RefitEveryDays { get; init; } = DefaultRefitEveryDays;

    public IReadOnlyList<double> Levels { get; init; } = [0.8, 0.95];

    /// <summary>Thresholds whose next-24-hour risk is verified; none skips the sample paths.</summary>
    public IReadOnlyList<RiskThreshold> Thresholds { get; init; } = [];

    public NightHours Night { get; init; } = NightHours.Default;

    /// <summary>Called before each day with the days done and the days in all.</summary>
    public Action<long, long>? Progress { get; init; }
}

/// <summary>A backtest's scores: per horizon (1-based), pooled over every horizon (as horizon 1), and per
/// threshold (in the order of <see cref="BacktestOptions.Thresholds"/>, the next-24-hour window).
/// <c>From</c>/<c>To</c> are the start of the first test day and the end of the last.</summary>
public sealed record BacktestResult(
    DateTimeOffset From,
    DateTimeOffset To,
    int Origins,
    int Refits,
    int RefitEveryDays,
    IReadOnlyList<HorizonScores> Horizons,
    HorizonScores Pooled,
    IReadOnlyList<ThresholdVerification> Thresholds);

/// <summary>
/// The backtest of ForecastHub, used by the service, the command line and the tests. From the start
/// of each test day (the origin) the next local day is forecast (hourly: 24 steps, daily: 3 steps)
/// from the recent data before the origin, as the service forecasts (<see cref="SiteForecaster.RecentWindow"/>),
/// by the model fitted on all data before the origin, and scored against what the grid observed
/// (interpolated steps are not scored). References: persistence (the same step a day before, see
/// <see cref="GridClock.DayBefore"/>) and the model's climatology. The grid of all readings is built
/// once; a fit sees <see cref="TimeGrid.Until"/> of it and a forecast the readings of its recent
/// window (found by binary search), so the cost is that of the fits and forecasts plus one pass over
/// the data. Null when no origin had data before it and enough observed steps to fit
/// (<see cref="SiteModelFitter.MinimumPoints"/> x 10).
/// </summary>
public static class Backtest
{
    public static BacktestResult? Run(IReadOnlyList<GridReading> readings, GridOptions grid, ModelSettings settings, BacktestOptions options)
    {
        ArgumentNullException.ThrowIfNull(readings);
        ArgumentNullException.ThrowIfNull(grid);
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(options);
        ArgumentOutOfRangeException.ThrowIfLessThan(options.Days, 1);
        ArgumentOutOfRangeException.ThrowIfNegative(options.RefitEveryDays);
        var sorted = InTimeOrder(readings);
        var cadence = grid.Cadence;
        var isDaily = cadence == GridCadence.Daily;
        var zone = GridBuilder.FindZone(grid.TimeZone);
        var horizons = isDaily ? 3 : 24;
        var lastDay = GridBuilder.LocalDate(options.DataEnd, zone);
        var firstDay = lastDay.AddDays(-options.Days + 1);
        var start = sorted.Length == 0 ? options.DataEnd : sorted[0].Time;
        var full = Build(sorted, grid, zone, start, GridClock.StepAfter(cadence, zone, GridClock.StepStart(cadence, zone, options.DataEnd), 1));
        var observed = new Dictionary<DateTimeOffset, double>();
        for (var i = 0; i < full.Count; i++)
        {
            if (!double.IsNaN(full.Values[i]) && !full.Interpolated[i])
            {
                observed[full.Times[i]] = full.Values[i];
            }
        }

        var thresholds = options.Thresholds;
        var events = thresholds.Select(_ => new ThresholdScoreAccumulator()).ToArray();
        var accumulator = new ScoreAccumulator(horizons, options.Levels);
        var pooled = new ScoreAccumulator(1, options.Levels);
        var recentWindow = SiteForecaster.RecentWindow(cadence);
        SiteModel? model = null;
        var lastFit = DateOnly.MinValue;
        var origins = 0;
        var refits = 0;
        for (var day = firstDay; day <= lastDay; day = day.AddDays(1))
        {
            options.Progress?.Invoke(day.DayNumber - firstDay.DayNumber, options.Days);
            var origin = GridBuilder.LocalDayStart(day, zone);
            var before = LowerBound(sorted, origin);
            if (before == 0)
            {
                continue;
            }

            if (model is null || day.DayNumber - lastFit.DayNumber >= options.RefitEveryDays)
            {
                var train = KnownAt(full, sorted, before, grid, zone, origin);
                if (train.ObservedCount < SiteModelFitter.MinimumPoints * 10)
                {
                    continue;
                }

                model = SiteModelFitter.Fit(train, settings);
                lastFit = day;
                refits++;
            }

            var recentFrom = origin - recentWindow;
            var recentStart = LowerBound(sorted, recentFrom);
            var recent = Build(new ArraySegment<GridReading>(sorted, recentStart, before - recentStart), grid, zone, recentFrom, origin);
            if (recent.LastValueIndex < 0)
            {
                continue;
            }

            var risk = thresholds.Count == 0 ? null : new RiskRequest(thresholds, options.Night, origin);
            var forecast = SiteForecaster.Forecast(model, recent, horizons, options.Levels, [], seed: day.DayNumber,
                paths: risk is null ? 1 : SiteForecaster.DefaultPaths, risk: risk);
            ScoreEvents(forecast, isDaily, thresholds, observed, zone, events);
            var times = forecast.Steps.Select(s => s.Time).ToArray();
            var climatology = model.Climatology.Mean(times);
            for (var h = 0; h < forecast.Steps.Count; h++)
            {
                var step = forecast.Steps[h];
                if (!observed.TryGetValue(step.Time, out var y))
                {
                    continue;
                }

                var yesterday = GridClock.DayBefore(cadence, zone, step.Time);
                var persistence = observed.TryGetValue(yesterday, out var p) ? p : double.NaN;
                var lower = step.Intervals.Select(i => i.Lower).ToArray();
                var upper = step.Intervals.Select(i => i.Upper).ToArray();
                accumulator.Add(h + 1, y, step.Mean, step.Sd, lower, upper, persistence, climatology[h]);
                pooled.Add(1, y, step.Mean, step.Sd, lower, upper, persistence, climatology[h]);
            }

            origins++;
        }

        if (origins == 0)
        {
            return null;
        }

        return new BacktestResult(
            GridBuilder.LocalDayStart(firstDay, zone),
            GridBuilder.LocalDayStart(lastDay.AddDays(1), zone),
            origins,
            refits,
            options.RefitEveryDays,
            accumulator.Result(),
            pooled.Result()[0],
            [.. events.Select(e => e.Result())]);
    }

    // The grid from the step holding `from` up to `to` (exclusive), as the service builds a site's grid.
    private static TimeGrid Build(IReadOnlyList<GridReading> readings, GridOptions grid, TimeZoneInfo zone, DateTimeOffset from, DateTimeOffset to)
    {
        var gridFrom = GridClock.StepStart(grid.Cadence, zone, from);
        return GridBuilder.Build(readings, grid, gridFrom, to > gridFrom ? to : null);
    }

    /// <summary>The grid of the readings before <paramref name="origin"/> (the first <paramref name="before"/>):
    /// the whole grid up to the origin, with what later data filled in undone. An origin inside a step
    /// (a zone whose midnight is not on the hour) builds that grid from the readings instead.</summary>
    private static TimeGrid KnownAt(TimeGrid full, GridReading[] sorted, int before, GridOptions grid, TimeZoneInfo zone, DateTimeOffset origin)
    {
        var steps = Array.BinarySearch(full.Times, origin);
        return steps > 0
            ? full.Until(steps - 1)
            : Build(new ArraySegment<GridReading>(sorted, 0, before), grid, zone, sorted[0].Time, origin);
    }

    /// <summary>The next-24-hour event of each threshold: at least one observed step beyond it, when at least
    /// 80 % of the window's steps were observed; the reference base rate is that of the window's local month.</summary>
    private static void ScoreEvents(SiteForecast forecast, bool isDaily, IReadOnlyList<RiskThreshold> thresholds,
        Dictionary<DateTimeOffset, double> observed, TimeZoneInfo zone, ThresholdScoreAccumulator[] events)
    {
        foreach (var risk in forecast.Risk.Where(r => r.Window.Name == RiskWindow.Next24h))
        {
            var index = IndexOf(thresholds, risk.Threshold);
            var times = isDaily
                ? [risk.Window.From]
                : Enumerable.Range(0, (int)Math.Round((risk.Window.To - risk.Window.From).TotalHours)).Select(h => risk.Window.From.AddHours(h)).ToArray();
            var values = times.Where(observed.ContainsKey).Select(t => observed[t]).ToArray();
            if (index >= 0 && values.Length > 0 && values.Length >= 0.8 * times.Length)
            {
                events[index].Add(risk.Probability, values.Any(risk.Threshold.IsBeyond), TimeZoneInfo.ConvertTime(risk.Window.From, zone).Month);
            }
        }
    }

    private static int IndexOf(IReadOnlyList<RiskThreshold> thresholds, RiskThreshold threshold)
    {
        for (var i = 0; i < thresholds.Count; i++)
        {
            if (thresholds[i] == threshold)
            {
                return i;
            }
        }

        return -1;
    }

    // Readings as stored come in time order; anything else is put in order once (stable, so equal times keep theirs).
    private static GridReading[] InTimeOrder(IReadOnlyList<GridReading> readings)
    {
        var array = readings.ToArray();
        for (var i = 1; i < array.Length; i++)
        {
            if (array[i].Time < array[i - 1].Time)
            {
                return [.. array.OrderBy(r => r.Time)];
            }
        }

        return array;
    }

    // The index of the first reading at or after `time` (the count of readings before it).
    private static int LowerBound(GridReading[] sorted, DateTimeOffset time)
    {
        int lo = 0, hi = sorted.Length;
        while (lo < hi)
        {
            var mid = (lo + hi) >>> 1;
            if (sorted[mid].Time < time)
            {
                lo = mid + 1;
            }
            else
            {
                hi = mid;
            }
        }

        return lo;
    }
}
