using ForecastHub.Core.Series;

namespace ForecastHub.Core.Diagnostics;

/// <summary>
/// Residual moments: Sd uses n - 1 (R sd); Skewness m3 / m2^1.5 and Kurtosis m4 / m2^2 use central
/// moments with 1/n (kurtosis 3 for a Gaussian, not excess). Input rules: null throws; no points
/// SeriesException(Empty); NaN SeriesException(NonFinite); a single point or constant residuals
/// give Sd 0 and Skewness = Kurtosis = 0 (undefined moments reported as 0, flagged by Sd = 0).
/// </summary>
public sealed record ResidualSummary(int Count, double Mean, double Sd, double Skewness, double Kurtosis)
{
    public static ResidualSummary Of(IReadOnlyList<double[]> residuals)
    {
        var summary = SegmentSummary.Of(residuals);
        var mean = summary.Mean;
        double m2 = 0, m3 = 0, m4 = 0;
        foreach (var segment in summary.Segments)
        {
            foreach (var value in segment)
            {
                var d = value - mean;
                var d2 = d * d;
                m2 += d2;
                m3 += d2 * d;
                m4 += d2 * d2;
            }
        }

        var n = summary.Count;
        var sd = n > 1 ? Math.Sqrt(m2 / (n - 1)) : 0;
        m2 /= n;
        m3 /= n;
        m4 /= n;
        if (summary.IsConstant || !(m2 > 0))
        {
            return new ResidualSummary(n, mean, 0, 0, 0);
        }

        return new ResidualSummary(n, mean, sd, m3 / Math.Pow(m2, 1.5), m4 / (m2 * m2));
    }

    public static ResidualSummary Of(double[] residuals) => Of([residuals]);
}
