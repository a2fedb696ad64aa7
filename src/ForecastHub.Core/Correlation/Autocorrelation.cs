using System.Buffers;
using ForecastHub.Core.Linear;
using ForecastHub.Core.Series;
using MathNet.Numerics.Distributions;

namespace ForecastHub.Core.Correlation;

/// <summary>
/// Sample autocovariance, ACF, PACF and white-noise band (R <c>acf</c>, <c>pacf</c> conventions).
/// Segments share one common mean; lagged products never cross from one segment into the next,
/// and the divisor is the total point count n (with one segment this is exactly R's 1/n ACF).
/// Input rules for every method: null throws ArgumentNullException; no points throws
/// SeriesException(Empty); NaN or infinity throws SeriesException(NonFinite); a constant series
/// throws SeriesException(Constant); maxLag is clamped to n - 1 as R does.
/// </summary>
public static class Autocorrelation
{
    /// <summary>Autocovariances c_0..c_maxLag, c_k = (1/n) sum (x_t - xbar)(x_{t+k} - xbar) within segments.</summary>
    public static double[] Autocovariance(IReadOnlyList<double[]> segments, int maxLag)
    {
        var summary = SegmentSummary.Of(segments).RequireVariance();
        return Autocovariance(summary, ClampLag(summary, maxLag));
    }

    /// <summary>ACF r_0..r_maxLag (r_0 = 1) of a segmented series.</summary>
    public static double[] Acf(IReadOnlyList<double[]> segments, int maxLag)
    {
        var c = Autocovariance(segments, maxLag);
        var c0 = c[0];
        for (var k = 0; k < c.Length; k++)
        {
            c[k] /= c0;
        }

        return c;
    }

    /// <summary>ACF r_0..r_maxLag of one contiguous series.</summary>
    public static double[] Acf(double[] series, int maxLag) => Acf([series], maxLag);

    /// <summary>PACF at lags 1..maxLag by Durbin-Levinson on the ACF (R <c>pacf</c>); element k-1 is lag k.</summary>
    public static double[] Pacf(IReadOnlyList<double[]> segments, int maxLag)
    {
        var c = Autocovariance(segments, maxLag);
        return DurbinLevinson.Run(c, c.Length - 1).Partials;
    }

    /// <summary>PACF at lags 1..maxLag of one contiguous series.</summary>
    public static double[] Pacf(double[] series, int maxLag) => Pacf([series], maxLag);

    /// <summary>Half-width of the white-noise band, qnorm(1 - alpha/2) / sqrt(n); n must be positive and 0 &lt; alpha &lt; 1.</summary>
    public static double Band(int n, double alpha = 0.05)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(n);
        if (!(alpha > 0 && alpha < 1))
        {
            throw new ArgumentOutOfRangeException(nameof(alpha), alpha, "alpha must lie strictly between 0 and 1.");
        }

        return Normal.InvCDF(0, 1, 1 - alpha / 2) / Math.Sqrt(n);
    }

    internal static double[] Autocovariance(SegmentSummary summary, int maxLag)
    {
        var c = new double[maxLag + 1];
        var mean = summary.Mean;
        foreach (var segment in summary.Segments)
        {
            var n = segment.Length;

            // A pooled scratch: fits call this several times on long series, and fresh large arrays cost page faults.
            var rented = ArrayPool<double>.Shared.Rent(n);
            var centered = rented.AsSpan(0, n);
            for (var t = 0; t < n; t++)
            {
                centered[t] = segment[t] - mean;
            }

            var lags = Math.Min(maxLag, n - 1);
            for (var k = 0; k <= lags; k++)
            {
                c[k] += SpanMath.Dot(centered[..(n - k)], centered[k..]);
            }

            ArrayPool<double>.Shared.Return(rented);
        }

        for (var k = 0; k <= maxLag; k++)
        {
            c[k] /= summary.Count;
        }

        return c;
    }

    private static int ClampLag(SegmentSummary summary, int maxLag)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(maxLag);
        return Math.Min(maxLag, summary.Count - 1);
    }
}
