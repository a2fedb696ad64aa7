using System.Buffers;
using System.Numerics;
using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Modeling;

namespace ForecastHub.Core.Risk;

/// <summary>
/// Seeded paths of the anomaly's deviation from its mean path over horizons 1..H:
/// d_k = sum phi_i d_{k-i} + sigma sqrt(g_k) eps_k (d = 0 up to the origin). The normal score
/// z_k = d_k / sd_k of each step is standard normal and the steps keep the AR dependence, so
/// mapping z_k through a step's <see cref="PredictiveDistribution"/> gives paths whose every step has
/// exactly that step's distribution (a Gaussian copula with the model's autocorrelation); the
/// next-day summary reads the deviations themselves. One set serves both, so a forecast simulates once.
/// Paths come in antithetic pairs (eps and -eps); rows are drawn in horizon order, so the first rows
/// are the same whatever H. Layout: element [k * Stride + j] is path j at horizon k + 1. The buffer
/// is pooled: dispose the paths when done.
/// </summary>
internal sealed class SamplePaths : IDisposable
{
    private double[]? buffer;

    private SamplePaths(double[] buffer, int stride, int count, int horizons)
    {
        this.buffer = buffer;
        Stride = stride;
        Count = count;
        Horizons = horizons;
    }

    /// <summary>The deviations d, [k * Stride + j] for path j at horizon k + 1.</summary>
    public ReadOnlySpan<double> Deviations => (buffer ?? throw new ObjectDisposedException(nameof(SamplePaths))).AsSpan(0, Horizons * Stride);

    public int Stride { get; }

    public int Count { get; }

    public int Horizons { get; }

    public static SamplePaths Simulate(ArModel ar, ReadOnlySpan<double> g, int horizons, int paths, int seed)
    {
        var p = ar.Order;
        var width = Vector<double>.Count;
        var stride = (paths + (2 * width) - 1) / (2 * width) * (2 * width);
        var half = stride / 2;
        var buffer = ArrayPool<double>.Shared.Rent(horizons * stride);
        var d = buffer.AsSpan(0, horizons * stride);
        var sampler = new GaussianSampler(seed);
        var coefficients = ar.Coefficients.Select(c => new Vector<double>(c)).ToArray();
        for (var k = 0; k < horizons; k++)
        {
            var row = d.Slice(k * stride, stride);
            var scale = Math.Sqrt(ar.InnovationVariance * g[k]);
            for (var j = 0; j < half; j++)
            {
                row[j] = scale * sampler.Next();
                row[half + j] = -row[j];
            }

            // Per block of paths the sum stays in a register over all lags, added in lag order (1, 2, ..., p).
            var lags = Math.Min(k, p);
            for (var j = 0; j < stride; j += width)
            {
                var sum = new Vector<double>(row[j..]);
                for (var i = 1; i <= lags; i++)
                {
                    sum += coefficients[i - 1] * new Vector<double>(d[(((k - i) * stride) + j)..]);
                }

                sum.CopyTo(row[j..]);
            }
        }

        return new SamplePaths(buffer, stride, paths, horizons);
    }

    /// <summary>The normal scores d / sd of horizon k + 1 (0 when sd is 0) for the first <see cref="Count"/> paths.</summary>
    public void Scores(int k, double sd, Span<double> destination)
    {
        var inverse = sd > 0 ? 1 / sd : 0;
        var row = Deviations.Slice(k * Stride, Count);
        for (var j = 0; j < row.Length; j++)
        {
            destination[j] = row[j] * inverse;
        }
    }

    public void Dispose()
    {
        if (buffer is not null)
        {
            ArrayPool<double>.Shared.Return(buffer);
            buffer = null;
        }
    }
}
