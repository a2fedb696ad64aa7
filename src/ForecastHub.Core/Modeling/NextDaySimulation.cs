using System.Numerics;
using ForecastHub.Core.Risk;

namespace ForecastHub.Core.Modeling;

/// <summary>
/// The next-day summary's values from the forecast's sample paths: mean_k + c d_k, with d_k the
/// simulated deviation (innovations sigma sqrt(g_k) eps_k) and c the interval calibration's spread
/// ratio (1 for Gaussian intervals). Computes per path the min, max and mean over horizons
/// first..last (1-based), vectorised across paths.
/// </summary>
internal static class NextDaySimulation
{
    public static (double[] Min, double[] Max, double[] Mean) Run(SamplePaths sample, ReadOnlySpan<double> meanPath, double inflation, int first, int last)
    {
        var width = Vector<double>.Count;
        var stride = sample.Stride;
        var d = sample.Deviations;
        var min = new double[stride];
        var max = new double[stride];
        var sum = new double[stride];
        Array.Fill(min, double.PositiveInfinity);
        Array.Fill(max, double.NegativeInfinity);
        var c = new Vector<double>(inflation);
        for (var k = first - 1; k < last; k++)
        {
            var row = d.Slice(k * stride, stride);
            var m = new Vector<double>(meanPath[k]);
            for (var j = 0; j < stride; j += width)
            {
                var value = m + (c * new Vector<double>(row[j..]));
                Vector.Min(new Vector<double>(min, j), value).CopyTo(min, j);
                Vector.Max(new Vector<double>(max, j), value).CopyTo(max, j);
                (new Vector<double>(sum, j) + value).CopyTo(sum, j);
            }
        }

        var paths = sample.Count;
        var hours = last - first + 1;
        var means = new double[paths];
        for (var j = 0; j < paths; j++)
        {
            means[j] = sum[j] / hours;
        }

        return (min[..paths], max[..paths], means);
    }
}
