namespace ForecastHub.Core.Verification;

/// <summary>Collects forecast/outcome pairs per horizon and level and turns them into <see cref="HorizonScores"/>.
/// Pairs whose outcome or forecast is NaN are skipped.</summary>
public sealed class ScoreAccumulator
{
    private readonly double[] levels;
    private readonly Sums[] sums;

    public ScoreAccumulator(int horizons, IReadOnlyList<double> levels)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(horizons, 1);
        ArgumentNullException.ThrowIfNull(levels);
        this.levels = [.. levels];
        sums = Enumerable.Range(0, horizons).Select(_ => new Sums(levels.Count)).ToArray();
    }

    /// <param name="horizon">1-based.</param>
    /// <param name="lower">Lower bounds, one per level.</param>
    /// <param name="upper">Upper bounds, one per level.</param>
    public void Add(int horizon, double observed, double mean, double sd, ReadOnlySpan<double> lower, ReadOnlySpan<double> upper, double persistence, double climatology)
    {
        if (double.IsNaN(observed) || double.IsNaN(mean) || double.IsNaN(persistence))
        {
            return;
        }

        var s = sums[horizon - 1];
        var e = mean - observed;
        s.Count++;
        s.AbsError += Math.Abs(e);
        s.SqError += e * e;
        s.Error += e;
        s.PersistenceAbs += Math.Abs(persistence - observed);
        s.PersistenceSq += (persistence - observed) * (persistence - observed);
        s.ClimatologyAbs += Math.Abs(climatology - observed);
        s.ClimatologySq += (climatology - observed) * (climatology - observed);
        s.Crps += Scores.CrpsGaussian(mean, sd, observed);
        for (var l = 0; l < levels.Length; l++)
        {
            var level = levels[l];
            s.Covered[l] += observed >= lower[l] && observed <= upper[l] ? 1 : 0;
            s.Width[l] += upper[l] - lower[l];
            s.Winkler[l] += Scores.Winkler(lower[l], upper[l], level, observed);
            s.Pinball[l] += (Scores.Pinball(lower[l], (1 - level) / 2, observed) + Scores.Pinball(upper[l], (1 + level) / 2, observed)) / 2;
        }
    }

    public IReadOnlyList<HorizonScores> Result() => sums.Select((s, i) => s.ToScores(i + 1, levels)).ToArray();

    /// <summary>Coverage at each level pooled over all horizons (weighted by pairs).</summary>
    public IReadOnlyList<double> PooledCoverage()
    {
        var total = sums.Sum(s => s.Count);
        return levels.Select((_, l) => total == 0 ? double.NaN : sums.Sum(s => s.Covered[l]) / total).ToArray();
    }

    private sealed class Sums(int levels)
    {
        public int Count;
        public double AbsError, SqError, Error, PersistenceAbs, PersistenceSq, ClimatologyAbs, ClimatologySq, Crps;
        public readonly double[] Covered = new double[levels], Width = new double[levels], Winkler = new double[levels], Pinball = new double[levels];

        public HorizonScores ToScores(int horizon, double[] levelValues)
        {
            double n = Count;
            var intervals = levelValues.Select((lv, l) => new IntervalScores(lv, Covered[l] / n, Width[l] / n, Winkler[l] / n, Pinball[l] / n)).ToArray();
            return new HorizonScores(
                horizon,
                Count,
                AbsError / n,
                Math.Sqrt(SqError / n),
                Error / n,
                PersistenceAbs / n,
                ClimatologyAbs / n,
                1 - SqError / PersistenceSq,
                1 - SqError / ClimatologySq,
                Crps / n,
                intervals);
        }
    }
}
