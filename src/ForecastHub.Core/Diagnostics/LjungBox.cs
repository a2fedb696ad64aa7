using ForecastHub.Core.Correlation;
using ForecastHub.Core.Series;
using MathNet.Numerics;

namespace ForecastHub.Core.Diagnostics;

/// <summary>
/// Ljung-Box Q = n(n+2) sum_{k=1}^{m} r_k^2 / (n-k), chi-squared with m - fitdf degrees of freedom
/// (R Box.test(type = "Ljung-Box", fitdf = p); fitdf counts the AR lags only). Segments share one
/// mean and r_k never pairs points across a gap. Input rules: null throws; no points
/// SeriesException(Empty); NaN SeriesException(NonFinite); constant residuals
/// SeriesException(Constant); lags &lt; 1, fitdf &lt; 0, lags &lt;= fitdf or lags &gt;= n ArgumentOutOfRangeException.
/// </summary>
public static class LjungBox
{
    public static LjungBoxResult Test(IReadOnlyList<double[]> residuals, int lags, int fitdf)
    {
        var summary = SegmentSummary.Of(residuals).RequireVariance();
        ArgumentOutOfRangeException.ThrowIfLessThan(lags, 1);
        ArgumentOutOfRangeException.ThrowIfNegative(fitdf);
        if (lags <= fitdf)
        {
            throw new ArgumentOutOfRangeException(nameof(lags), lags, $"lags must exceed fitdf ({fitdf}) so the test has degrees of freedom.");
        }

        var n = summary.Count;
        if (lags >= n)
        {
            throw new ArgumentOutOfRangeException(nameof(lags), lags, $"lags must be below the number of residuals ({n}).");
        }

        var c = Autocorrelation.Autocovariance(summary, lags);
        var sum = 0.0;
        for (var k = 1; k <= lags; k++)
        {
            var r = c[k] / c[0];
            sum += r * r / (n - k);
        }

        var statistic = n * (n + 2.0) * sum;
        var df = lags - fitdf;
        return new LjungBoxResult(lags, statistic, df, SpecialFunctions.GammaUpperRegularized(df / 2.0, statistic / 2));
    }

    public static LjungBoxResult Test(double[] residuals, int lags, int fitdf) => Test([residuals], lags, fitdf);
}
