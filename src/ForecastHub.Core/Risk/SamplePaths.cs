using System.Numerics;
using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Modeling;

namespace ForecastHub.Core.Risk;

/// <summary>
/// Seeded paths of normal scores z_k = d_k / sd_k over horizons 1..H, where
/// d_k = sum phi_i d_{k-i} + sigma sqrt(g_k) eps_k (d = 0 up to the origin) is the anomaly's deviation
/// from its mean path. Each z_k is standard normal and the steps keep the AR dependence, so
/// mapping z_k through a step's <see cref="PredictiveDistribution"/> gives paths whose every step has
/// exactly that step's distribution (a Gaussian copula with the model's autocorrelation).
/// Paths come in antithetic pairs (eps and -eps). Layout: element [k * Stride + j] is path j at horizon k + 1.
/// </summary>
internal sealed class SamplePaths
{
    private SamplePaths(double[] scores, int stride, int count, int horizons)
    {
        Scores = scores;
        Stride = stride;
        Count = count;
        Horizons = horizons;
    }

    public double[] Scores { get; }

    public int Stride { get; }

    public int Count { get; }

    public int Horizons { get; }

    public static SamplePaths Simulate(ArModel ar, ReadOnlySpan<double> g, ReadOnlySpan<double> sd, int horizons, int paths, int seed)
    {
        var p = ar.Order;
        var width = Vector<double>.Count;
        var stride = (paths + (2 * width) - 1) / (2 * width) * (2 * width);
        var half = stride / 2;
        var d = new double[horizons * stride];
        var sampler = new GaussianSampler(seed);
        for (var k = 0; k < horizons; k++)
        {
            var row = d.AsSpan(k * stride, stride);
            var scale = Math.Sqrt(ar.InnovationVariance * g[k]);
            for (var j = 0; j < half; j++)
            {
                row[j] = scale * sampler.Next();
                row[half + j] = -row[j];
            }

            for (var i = 1; i <= Math.Min(k, p); i++)
            {
                var c = new Vector<double>(ar.Coefficients[i - 1]);
                var previous = d.AsSpan((k - i) * stride, stride);
                for (var j = 0; j < stride; j += width)
                {
                    (new Vector<double>(row[j..]) + c * new Vector<double>(previous[j..])).CopyTo(row[j..]);
                }
            }
        }

        // Standardise only after the recursion has used the raw deviations of every earlier step.
        for (var k = 0; k < horizons; k++)
        {
            var inverse = new Vector<double>(sd[k] > 0 ? 1 / sd[k] : 0);
            var row = d.AsSpan(k * stride, stride);
            for (var j = 0; j < stride; j += width)
            {
                (new Vector<double>(row[j..]) * inverse).CopyTo(row[j..]);
            }
        }

        return new SamplePaths(d, stride, paths, horizons);
    }
}
