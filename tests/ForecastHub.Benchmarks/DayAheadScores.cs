using ForecastHub.Core.Verification;
using MathNet.Numerics.Distributions;

namespace ForecastHub.Benchmarks;

/// <summary>
/// A one-step predictive distribution known by a few quantiles: between them the quantile is linear
/// in the normal score z = Phi^-1(p) (as the calibration table interpolates), beyond the outermost
/// two on each side it is extended along their line (Gaussian-shaped tails). A Gaussian forecast's
/// quantiles reproduce it exactly.
/// </summary>
internal sealed class PredictiveQuantiles
{
    private readonly double[] scores;
    private readonly double[] values;

    public PredictiveQuantiles(IEnumerable<(double Probability, double Value)> quantiles)
    {
        var sorted = quantiles.OrderBy(q => q.Probability).ToArray();
        if (sorted.Length < 2)
        {
            throw new ArgumentException("At least two quantiles are needed.", nameof(quantiles));
        }

        scores = sorted.Select(q => Normal.InvCDF(0, 1, q.Probability)).ToArray();
        values = sorted.Select(q => q.Value).ToArray();
    }

    /// <summary>The quantiles of N(mean, sd^2) at the given probabilities.</summary>
    public static PredictiveQuantiles Gaussian(double mean, double sd, IEnumerable<double> probabilities) =>
        new(probabilities.Select(p => (p, mean + sd * Normal.InvCDF(0, 1, p))));

    public double Quantile(double p)
    {
        var z = Normal.InvCDF(0, 1, p);
        var i = 1;
        while (i < scores.Length - 1 && scores[i] < z)
        {
            i++;
        }

        return values[i - 1] + (z - scores[i - 1]) * (values[i] - values[i - 1]) / (scores[i] - scores[i - 1]);
    }

    /// <summary>P(value &lt; threshold): the normal score where the piecewise-linear quantile reaches the threshold.</summary>
    public double ProbabilityBelow(double threshold)
    {
        var i = 1;
        while (i < values.Length - 1 && values[i] < threshold)
        {
            i++;
        }

        var slope = (values[i] - values[i - 1]) / (scores[i] - scores[i - 1]);
        if (!(slope > 0))
        {
            return threshold <= values[i - 1] ? 0 : 1;
        }

        return Normal.CDF(0, 1, scores[i - 1] + (threshold - values[i - 1]) / slope);
    }

    /// <summary>CRPS as twice the pinball loss integrated over the probability (midpoint rule on 2,000 points).</summary>
    public double Crps(double observed)
    {
        const int points = 2000;
        var sum = 0.0;
        for (var k = 0; k < points; k++)
        {
            var tau = (k + 0.5) / points;
            var q = Quantile(tau);
            sum += Scores.Pinball(q, tau, observed);
        }

        return 2 * sum / points;
    }
}

/// <summary>One method's day-ahead forecasts of one series: mean, 80 % and 95 % intervals, the predictive distribution.</summary>
internal sealed record DayAheadForecasts(
    string Method,
    double[] Mean,
    double[] Lower80,
    double[] Upper80,
    double[] Lower95,
    double[] Upper95,
    PredictiveQuantiles[] Distribution);

/// <summary>Scores of one method on one series.</summary>
internal sealed record DayAheadScore(double Mae, double Rmse, double Crps, double Coverage80, double Coverage95, double Brier, int Days)
{
    public static DayAheadScore Of(DayAheadForecasts f, double[] observed, double threshold)
    {
        var n = observed.Length;
        return new DayAheadScore(
            Enumerable.Range(0, n).Average(i => Math.Abs(observed[i] - f.Mean[i])),
            Math.Sqrt(Enumerable.Range(0, n).Average(i => Math.Pow(observed[i] - f.Mean[i], 2))),
            Enumerable.Range(0, n).Average(i => f.Distribution[i].Crps(observed[i])),
            Enumerable.Range(0, n).Average(i => Covers(f.Lower80[i], f.Upper80[i], observed[i])),
            Enumerable.Range(0, n).Average(i => Covers(f.Lower95[i], f.Upper95[i], observed[i])),
            Enumerable.Range(0, n).Average(i => Math.Pow(f.Distribution[i].ProbabilityBelow(threshold) - (observed[i] < threshold ? 1 : 0), 2)),
            n);
    }

    private static double Covers(double lower, double upper, double y) => y >= lower && y <= upper ? 1 : 0;
}

/// <summary>Paired comparison of daily losses: mean difference, a circular moving-block bootstrap
/// interval (blocks of 7 days keep the weekly serial dependence of the errors; seeded) and the plain paired t.</summary>
internal sealed record PairedDifference(double Mean, double Lower95, double Upper95, double T)
{
    public static PairedDifference Of(double[] ours, double[] theirs, int seed = 20151231)
    {
        var n = ours.Length;
        var d = Enumerable.Range(0, n).Select(i => ours[i] - theirs[i]).ToArray();
        var mean = d.Average();
        var sd = Math.Sqrt(d.Sum(v => (v - mean) * (v - mean)) / (n - 1));
        const int block = 7;
        const int resamples = 10_000;
        var random = new Random(seed);
        var means = new double[resamples];
        for (var r = 0; r < resamples; r++)
        {
            var sum = 0.0;
            for (var taken = 0; taken < n;)
            {
                var start = random.Next(n);
                for (var k = 0; k < block && taken < n; k++, taken++)
                {
                    sum += d[(start + k) % n];
                }
            }

            means[r] = sum / n;
        }

        Array.Sort(means);
        return new PairedDifference(mean, means[(int)(0.025 * resamples)], means[(int)(0.975 * resamples) - 1], mean / (sd / Math.Sqrt(n)));
    }
}
