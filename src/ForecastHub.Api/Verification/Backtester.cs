using ForecastHub.Api.Forecasts;
using ForecastHub.Api.Models;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Risk;
using ForecastHub.Core.Verification;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Verification;

/// <summary>
/// Rolling-origin backtest as the service runs it: an origin at the end of each of the last
/// <c>days</c> local days; the model is refitted on the data before the origin at the first origin
/// and then every <c>refitEveryDays</c>; from each origin the next local day (hourly: 24 steps,
/// daily: 3 steps) is forecast from the data up to the origin and scored against what was observed.
/// The model fits and forecasts are the core's; this class only walks the origins.
/// </summary>
public static class Backtester
{
    private static readonly double[] Levels = [0.80, 0.95];

    /// <param name="thresholds">Thresholds whose next-24-hour risk is verified (the site's and any asked for); none skips the sample paths.</param>
    /// <param name="progress">Called after each day with the days done and the days in all.</param>
    public static BacktestResponse? Run(SiteRecord site, IReadOnlyList<GridReading> readings, DateTimeOffset dataEnd, int days, int refitEveryDays,
        IReadOnlyList<RiskThreshold>? thresholds = null, Action<long, long>? progress = null)
    {
        ArgumentNullException.ThrowIfNull(site);
        ArgumentNullException.ThrowIfNull(readings);
        var isDaily = site.IsDaily;
        var zone = GridBuilder.FindZone(site.TimeZone);
        var settings = site.Model;
        var horizons = isDaily ? 3 : 24;
        var lastDay = GridBuilder.LocalDate(dataEnd, zone);
        var firstDay = lastDay.AddDays(-days + 1);
        var start = readings.Count == 0 ? dataEnd : readings[0].Time;
        var full = SiteGridLoader.Build(site, readings, start, SiteGridLoader.NextStep(site, SiteGridLoader.AlignDown(site, dataEnd)));
        var observed = new Dictionary<DateTimeOffset, double>();
        for (var i = 0; i < full.Count; i++)
        {
            if (!double.IsNaN(full.Values[i]) && !full.Interpolated[i])
            {
                observed[full.Times[i]] = full.Values[i];
            }
        }

        thresholds ??= [];
        var night = site.Risk.Night;
        var events = thresholds.Select(_ => new ThresholdScoreAccumulator()).ToArray();
        var accumulator = new ScoreAccumulator(horizons, Levels);
        var pooled = new ScoreAccumulator(1, Levels);
        SiteModel? model = null;
        var lastFit = DateOnly.MinValue;
        var origins = 0;
        for (var day = firstDay; day <= lastDay; day = day.AddDays(1))
        {
            progress?.Invoke(day.DayNumber - firstDay.DayNumber, days);
            var origin = GridBuilder.LocalDayStart(day, zone);
            var history = readings.Where(r => r.Time < origin).ToList();
            if (history.Count == 0)
            {
                continue;
            }

            if (model is null || day.DayNumber - lastFit.DayNumber >= refitEveryDays)
            {
                var train = SiteGridLoader.Build(site, history, history[0].Time, origin);
                if (train.ObservedCount < SiteModelFitter.MinimumPoints * 10)
                {
                    continue;
                }

                model = SiteModelFitter.Fit(train, settings);
                lastFit = day;
            }

            var recentFrom = origin - (isDaily ? ForecastService.DailyRecentWindow : ForecastService.HourlyRecentWindow);
            var recent = SiteGridLoader.Build(site, history.Where(r => r.Time >= recentFrom).ToList(), recentFrom, origin);
            if (recent.LastValueIndex < 0)
            {
                continue;
            }

            var risk = thresholds.Count == 0 ? null : new RiskRequest(thresholds, night, origin);
            var forecast = SiteForecaster.Forecast(model, recent, horizons, Levels, [], seed: day.DayNumber,
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

                var yesterday = GridClock.DayBefore(site.Cadence, zone, step.Time);
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

        var perHorizon = accumulator.Result();
        return new BacktestResponse(
            GridBuilder.LocalDayStart(firstDay, zone),
            GridBuilder.LocalDayStart(lastDay.AddDays(1), zone),
            origins,
            refitEveryDays,
            [.. perHorizon.Where(s => s.Count > 0).Select(s => ScoresResponse.From(s, s.Horizon))],
            ScoresResponse.From(pooled.Result()[0], null))
        {
            Thresholds = [.. thresholds.Select((t, i) => ThresholdScoresResponse.From(t, RiskWindow.Next24h, events[i].Result()))],
        };
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
}
