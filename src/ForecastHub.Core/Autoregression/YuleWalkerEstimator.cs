using ForecastHub.Core.Correlation;
using ForecastHub.Core.Series;
using MathNet.Numerics.LinearAlgebra;

namespace ForecastHub.Core.Autoregression;

/// <summary>Yule-Walker (R ar.yw): Durbin-Levinson on the pooled sample autocovariances.</summary>
internal static class YuleWalkerEstimator
{
    public static LevinsonPath Path(SegmentSummary summary, int maxOrder, out double[] autocovariances)
    {
        autocovariances = Autocorrelation.Autocovariance(summary, maxOrder);
        return DurbinLevinson.Run(autocovariances, maxOrder);
    }

    /// <summary>R's reported var.pred = v_p n / (n - (p + 1)); standard errors from var.pred / n * Gamma_p^{-1} (R asy.var.coef).</summary>
    public static ArModel Model(SegmentSummary summary, LevinsonPath path, double[] autocovariances, int order)
    {
        var n = summary.Count;
        var variance = path.Variances[order] * n / (n - (order + 1.0));
        var coefficients = (double[])path.Coefficients[order].Clone();
        var errors = AsymptoticStandardErrors(autocovariances, order, variance, n);
        return ArModel.Create(ArMethod.YuleWalker, summary, summary.Mean, coefficients, errors, variance);
    }

    /// <summary>sqrt(diag(Gamma_p^{-1}) * variance / n), Gamma_p the Toeplitz matrix of c_0..c_{p-1}.</summary>
    internal static double[] AsymptoticStandardErrors(double[] autocovariances, int order, double variance, int n)
    {
        if (order == 0)
        {
            return [];
        }

        var gamma = Matrix<double>.Build.Dense(order, order, (i, j) => autocovariances[Math.Abs(i - j)]);
        var inverse = gamma.Inverse();
        var errors = new double[order];
        for (var i = 0; i < order; i++)
        {
            errors[i] = Math.Sqrt(inverse[i, i] * variance / n);
        }

        return errors;
    }
}
