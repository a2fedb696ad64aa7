using System.Buffers;
using System.Numerics;
using ForecastHub.Core.Autoregression;

namespace ForecastHub.Core.Modeling;

/// <summary>
/// Monte Carlo paths of the anomaly: deviations d_k = sum phi_i d_{k-i} + s_k eps_k from the mean
/// path (d = 0 up to the origin), eps standard normal, s_k = c sigma sqrt(g_k) with c the interval
/// calibration's spread ratio. Computes per path the min, max and mean of mean_k + d_k over
/// horizons first..last (1-based), vectorised across paths. Paths come in antithetic pairs (eps and
/// -eps), which halves the draws and lowers the variance of the estimated mean.
/// </summary>
internal static class NextDaySimulation
{
    public static (double[] Min, double[] Max, double[] Mean) Run(ArModel ar, ReadOnlySpan<double> meanPath, ReadOnlySpan<double> g, double inflation, int first, int last, int paths, int seed)
    {
        var p = ar.Order;
        var phi = ar.Coefficients.ToArray();
        var sampler = new GaussianSampler(seed);
        var width = Vector<double>.Count;
        var stride = (paths + (2 * width) - 1) / (2 * width) * (2 * width);
        var half = stride / 2;
        var buffer = ArrayPool<double>.Shared.Rent(last * stride);
        var d = buffer.AsSpan(0, last * stride);
        var min = new double[stride];
        var max = new double[stride];
        var sum = new double[stride];
        Array.Fill(min, double.PositiveInfinity);
        Array.Fill(max, double.NegativeInfinity);
        try
        {
            for (var k = 0; k < last; k++)
            {
                var row = d.Slice(k * stride, stride);
                var scale = inflation * Math.Sqrt(ar.InnovationVariance * g[k]);
                for (var j = 0; j < half; j++)
                {
                    row[j] = scale * sampler.Next();
                    row[half + j] = -row[j];
                }

                for (var i = 1; i <= Math.Min(k, p); i++)
                {
                    var c = new Vector<double>(phi[i - 1]);
                    var previous = d.Slice((k - i) * stride, stride);
                    for (var j = 0; j < stride; j += width)
                    {
                        (new Vector<double>(row[j..]) + c * new Vector<double>(previous[j..])).CopyTo(row[j..]);
                    }
                }

                if (k + 1 < first)
                {
                    continue;
                }

                var m = new Vector<double>(meanPath[k]);
                for (var j = 0; j < stride; j += width)
                {
                    var value = m + new Vector<double>(row[j..]);
                    Vector.Min(new Vector<double>(min, j), value).CopyTo(min, j);
                    Vector.Max(new Vector<double>(max, j), value).CopyTo(max, j);
                    (new Vector<double>(sum, j) + value).CopyTo(sum, j);
                }
            }
        }
        finally
        {
            ArrayPool<double>.Shared.Return(buffer);
        }

        var hours = last - first + 1;
        var means = new double[paths];
        for (var j = 0; j < paths; j++)
        {
            means[j] = sum[j] / hours;
        }

        return (min[..paths], max[..paths], means);
    }
}
