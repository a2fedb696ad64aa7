using ForecastHub.Api.Models;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Risk;
using ForecastHub.Core.Verification;
using ForecastHub.Storage.Verification;

namespace ForecastHub.Api.Verification;

/// <summary>One observed grid point of an archived day with what was forecast for it.</summary>
public sealed record ScoredPoint(
    DateTimeOffset Time,
    double Observed,
    double Mean,
    double Sd,
    IReadOnlyList<double> Lower,
    IReadOnlyList<double> Upper,
    double Persistence,
    double Climatology);

/// <summary>One scored step of a threshold: the forecast chance of the step beyond it, and whether the observed value was.</summary>
public sealed record ThresholdCase(double Probability, bool Happened);

/// <summary>The cases of one site threshold over a scored day.</summary>
public sealed record ThresholdDayScore(string? Id, double Threshold, ThresholdDirection Direction, IReadOnlyList<ThresholdCase> Cases);

/// <summary>
/// The live score of one archived day-ahead forecast: the forecast/outcome pairs themselves, so
/// any window of days pools exactly through the core's score accumulator. Levels are fractions.
/// </summary>
/// <remarks><c>Thresholds</c> is null in scores stored before threshold cases were kept (still format 2).</remarks>
public sealed record DayScore(DateOnly Date, DateTimeOffset IssuedAt, IReadOnlyList<double> Levels, IReadOnlyList<ScoredPoint> Points,
    IReadOnlyList<ThresholdDayScore>? Thresholds = null)
{
    /// <summary>The stored form of a day's score; the unversioned JSON of earlier builds counts as format 1.</summary>
    public static readonly StoredFormat<DayScore> Format = new("score", version: 2);

    /// <summary>The stored scores this build reads; a score of another format (older or newer) is left out of every window, never misread.</summary>
    public static List<DayScore> ReadStored(IEnumerable<LiveScore> stored) =>
        [.. stored.Select(s => Format.TryRead(s.ScoresJson, out var day, out _) ? day : null).OfType<DayScore>()];

    /// <summary>Scores of the pooled pairs of <paramref name="days"/> (one horizon: day-ahead); null when no pair can be scored.</summary>
    public static HorizonScores? Pool(IReadOnlyCollection<DayScore> days)
    {
        ArgumentNullException.ThrowIfNull(days);
        var levels = days.FirstOrDefault(d => d.Points.Count > 0)?.Levels;
        if (levels is null)
        {
            return null;
        }

        var accumulator = new ScoreAccumulator(1, levels);
        foreach (var point in days.Where(d => d.Levels.SequenceEqual(levels)).SelectMany(d => d.Points))
        {
            accumulator.Add(1, point.Observed, point.Mean, point.Sd, point.Lower.ToArray(), point.Upper.ToArray(), point.Persistence, point.Climatology);
        }

        var scores = accumulator.Result()[0];
        return scores.Count == 0 ? null : scores;
    }

    /// <summary>Per threshold (in the order first met), the verification of the pooled step cases of <paramref name="days"/>
    /// through the core's threshold accumulator; the reference base rate is that of the day's local calendar month.</summary>
    public static List<(RiskThreshold Threshold, ThresholdVerification Scores)> PoolThresholds(IReadOnlyCollection<DayScore> days)
    {
        ArgumentNullException.ThrowIfNull(days);
        var pooled = new Dictionary<RiskThreshold, ThresholdScoreAccumulator>();
        var order = new List<RiskThreshold>();
        foreach (var day in days)
        {
            foreach (var threshold in day.Thresholds ?? [])
            {
                var key = new RiskThreshold(threshold.Id, threshold.Direction, threshold.Threshold);
                if (!pooled.TryGetValue(key, out var accumulator))
                {
                    pooled[key] = accumulator = new ThresholdScoreAccumulator();
                    order.Add(key);
                }

                foreach (var c in threshold.Cases)
                {
                    accumulator.Add(c.Probability, c.Happened, day.Date.Month);
                }
            }
        }

        return [.. order.Select(t => (t, pooled[t].Result()))];
    }
}
