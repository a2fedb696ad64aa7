using System.Collections.Concurrent;
using ForecastHub.Api.Forecasts;
using ForecastHub.Api.Models;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Risk;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Verification;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Verification;

/// <summary>The forecast of one archived day: levels as fractions, and the steps that fall on the day.</summary>
public sealed record ArchivedDay(IReadOnlyList<double> Levels, IReadOnlyList<ArchivedStep> Steps)
{
    /// <summary>The stored form of an archived day; the unversioned JSON of earlier builds counts as format 1.</summary>
    public static readonly StoredFormat<ArchivedDay> Format = new("day", version: 2);
}

/// <summary>One archived step; <c>Probabilities</c> (the chance of the step beyond each site threshold) is null in days
/// archived before they were kept, which still read as format 2 and are scored without threshold scores.</summary>
public sealed record ArchivedStep(DateTimeOffset Time, double Mean, double Sd, IReadOnlyList<double> Lower, IReadOnlyList<double> Upper,
    IReadOnlyList<StepProbability>? Probabilities = null);

/// <summary>
/// Live verification, run by the sweep for each site: once per local day the forecast for the next
/// local day is issued and archived (the first one issued for a day is kept), and every archived day
/// that has ended is scored against what was observed, once enough of it was observed.
/// </summary>
public sealed class DayAheadArchiveStep(
    ModelService models,
    ForecastService forecasts,
    IForecastArchive archive,
    SiteGridLoader grids,
    SiteVersions versions,
    IOptions<LiveScoreOptions> options,
    TimeProvider clock) : ISweepStep
{
    /// <summary>An archived day still not observed enough this long after it ended is scored empty and left alone.</summary>
    public static readonly TimeSpan GiveUpAfter = TimeSpan.FromDays(3);

    private static readonly double[] Levels = [0.80, 0.95];
    // The last target day archived per site, with the site's internal key: a site created again under the same id starts afresh.
    private readonly ConcurrentDictionary<string, (long SiteKey, DateOnly Through)> archivedThrough = new(StringComparer.Ordinal);

    public async Task RunAsync(SiteRecord site, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(site);
        var model = await models.GetAsync(site, cancellationToken);
        if (model is null)
        {
            return;
        }

        await ArchiveTomorrowAsync(site, model, cancellationToken);
        await ScoreEndedDaysAsync(site, model, cancellationToken);
    }

    private async Task ArchiveTomorrowAsync(SiteRecord site, ServingModel model, CancellationToken cancellationToken)
    {
        var zone = GridBuilder.FindZone(site.TimeZone);
        var now = clock.GetUtcNow();
        var target = GridBuilder.LocalDate(now, zone).AddDays(1);
        if (archivedThrough.TryGetValue(site.Id, out var done) && done.SiteKey == site.Key && done.Through >= target)
        {
            return;
        }

        if (await archive.HasArchivedAsync(site.Id, target, cancellationToken))
        {
            archivedThrough[site.Id] = (site.Key, target);
            return;
        }

        var dayStart = GridBuilder.LocalDayStart(target, zone);
        var dayEnd = GridBuilder.LocalDayStart(target.AddDays(1), zone);
        var current = SiteGridLoader.AlignDown(site, now);
        var steps = site.IsDaily ? 2 : (int)Math.Ceiling((dayEnd - current).TotalHours);
        var recent = await forecasts.RecentGridAsync(site, now, cancellationToken);
        if (recent is null)
        {
            return;
        }

        // The core's forecast itself (no next-day simulation needed): the same path and intervals the forecast endpoint serves.
        // Step probabilities come from each step's predictive distribution, so no sample paths are needed for them either.
        var risk = new RiskRequest(site.Risk.WithQueryThresholds([], []), site.Risk.Night, now);
        var forecast = SiteForecaster.Forecast(model.Model, recent, steps, Levels, [], seed: 0, paths: 0, risk: risk);
        var daySteps = forecast.Steps.Where(s => s.Time >= dayStart && s.Time < dayEnd)
            .Select(s => new ArchivedStep(s.Time, s.Mean, s.Sd,
                [.. s.Intervals.Select(i => i.Lower)], [.. s.Intervals.Select(i => i.Upper)], s.Probabilities))
            .ToList();
        if (daySteps.Count == 0)
        {
            return;
        }

        var json = ArchivedDay.Format.Write(new ArchivedDay(Levels, daySteps));
        // Refused when the site was deleted (and perhaps created again) since the sweep read it.
        await archive.ArchiveAsync(new ArchivedForecast(site.Id, site.Key, target, now, forecast.LastData, model.Stored.FittedAt, json), cancellationToken);
        archivedThrough[site.Id] = (site.Key, target);
    }

    private async Task ScoreEndedDaysAsync(SiteRecord site, ServingModel model, CancellationToken cancellationToken)
    {
        var zone = GridBuilder.FindZone(site.TimeZone);
        var now = clock.GetUtcNow();
        foreach (var archived in await archive.ListUnscoredAsync(site.Id, 31, cancellationToken))
        {
            var dayStart = GridBuilder.LocalDayStart(archived.TargetDate, zone);
            var dayEnd = GridBuilder.LocalDayStart(archived.TargetDate.AddDays(1), zone);
            if (now < dayEnd)
            {
                break;
            }

            if (!ArchivedDay.Format.TryRead(archived.ForecastJson, out var day, out _))
            {
                // A day archived in another format (older or newer build) is scored empty and left alone, never misread.
                if (!await SaveScoreAsync(site, new DayScore(archived.TargetDate, archived.IssuedAt, [], []), now, cancellationToken))
                {
                    return;
                }

                continue;
            }

            var score = await ScoreAsync(site, model, archived, day, dayStart, dayEnd, cancellationToken);
            var observedShare = day.Steps.Count == 0 ? 0 : (double)score.Points.Count / day.Steps.Count;
            if (observedShare < options.Value.MinObservedShare && now - dayEnd < GiveUpAfter)
            {
                continue;
            }

            if (observedShare < options.Value.MinObservedShare)
            {
                score = score with { Points = [], Thresholds = [] };
            }

            if (!await SaveScoreAsync(site, score, now, cancellationToken))
            {
                return;
            }
        }
    }

    /// <summary>False when the site was deleted (and perhaps created again) since the sweep read it.</summary>
    private async Task<bool> SaveScoreAsync(SiteRecord site, DayScore score, DateTimeOffset now, CancellationToken cancellationToken)
    {
        if (!await archive.SaveScoreAsync(new LiveScore(site.Id, site.Key, score.Date, now, DayScore.Format.Write(score)), cancellationToken))
        {
            return false;
        }

        versions.ModelChanged(site.Id);
        return true;
    }

    private async Task<DayScore> ScoreAsync(SiteRecord site, ServingModel model, ArchivedForecast archived, ArchivedDay day,
        DateTimeOffset dayStart, DateTimeOffset dayEnd, CancellationToken cancellationToken)
    {
        // Persistence needs the day before as well: the same hour yesterday, or yesterday's value.
        var grid = await grids.LoadAsync(site, dayStart.AddDays(-1), dayEnd, cancellationToken);
        var byTime = new Dictionary<DateTimeOffset, double>();
        if (grid is not null)
        {
            for (var i = 0; i < grid.Count; i++)
            {
                // Only observed values score a forecast; interpolated ones are the service's own guess.
                if (!double.IsNaN(grid.Values[i]) && !grid.Interpolated[i])
                {
                    byTime[grid.Times[i]] = grid.Values[i];
                }
            }
        }

        var observedSteps = day.Steps.Where(s => byTime.ContainsKey(s.Time)).ToList();
        double[] climatology = observedSteps.Count == 0 ? [] : model.Model.Climatology.Mean([.. observedSteps.Select(s => s.Time)]);
        var zone = GridBuilder.FindZone(site.TimeZone);
        var points = observedSteps.Select((s, i) =>
        {
            var yesterday = GridClock.DayBefore(site.Cadence, zone, s.Time);
            var persistence = byTime.TryGetValue(yesterday, out var p) ? p : double.NaN;
            return new ScoredPoint(s.Time, byTime[s.Time], s.Mean, s.Sd, s.Lower, s.Upper, persistence, climatology[i]);
        }).ToList();
        // Each observed step is one case per threshold: its probability, and whether the observed value lay beyond.
        var thresholds = observedSteps.SelectMany(s => (s.Probabilities ?? []).Select(p => (p, Happened: new RiskThreshold(p.Id, p.Direction, p.Threshold).IsBeyond(byTime[s.Time]))))
            .GroupBy(c => (c.p.Id, c.p.Threshold, c.p.Direction))
            .Select(g => new ThresholdDayScore(g.Key.Id, g.Key.Threshold, g.Key.Direction, [.. g.Select(c => new ThresholdCase(c.p.Probability, c.Happened))]))
            .ToList();
        return new DayScore(archived.TargetDate, archived.IssuedAt, day.Levels, points, thresholds);
    }
}
