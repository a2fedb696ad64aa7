using ForecastHub.Api.Models;
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

/// <summary>
/// The live score of one archived day-ahead forecast: the forecast/outcome pairs themselves, so
/// any window of days pools exactly through the core's score accumulator. Levels are fractions.
/// </summary>
public sealed record DayScore(DateOnly Date, DateTimeOffset IssuedAt, IReadOnlyList<double> Levels, IReadOnlyList<ScoredPoint> Points)
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
}
