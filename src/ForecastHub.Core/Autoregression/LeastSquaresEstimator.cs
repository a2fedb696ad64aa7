using ForecastHub.Core.Series;
using MathNet.Numerics.LinearAlgebra;

namespace ForecastHub.Core.Autoregression;

/// <summary>
/// Least squares (R ar.ols, demean = TRUE, intercept = TRUE): x_t - xbar regressed on an
/// intercept and p lags, rows stacked over segments.
/// </summary>
internal static class LeastSquaresEstimator
{
    /// <summary>
    /// Residual variance RSS_m / rows for every order m = 0..maxOrder on ONE common sample (rows
    /// t &gt;= maxOrder of each segment: a Gram built with lags = firstRow = maxOrder), so criteria compare like with like. Nested fits come from one
    /// Cholesky factor: RSS_m = y'y - sum_{i &lt;= m} z_i^2 with z = L^{-1} X'y.
    /// </summary>
    public static double[] CommonSampleVariances(LaggedGram gram)
    {
        var maxOrder = gram.Lags;
        var rows = gram.Rows;
        var factor = Cholesky(gram.Gram, maxOrder);
        var z = ForwardSolve(factor, gram.CrossY);
        var variances = new double[maxOrder + 1];
        var rss = gram.SumSquaresY;
        for (var m = 0; m <= maxOrder; m++)
        {
            rss -= z[m] * z[m];
            variances[m] = Math.Max(rss, 0) / rows;
        }

        return variances;
    }

    /// <summary>Order-p fit on its own sample (rows t &gt;= p), equal to R ar.ols(order.max = p, aic = FALSE); var.pred = RSS / rows; se = sqrt(diag((X'X)^{-1}) var.pred).</summary>
    public static ArModel Fit(SegmentSummary summary, int order, LaggedGram? sharedGram = null)
    {
        var gram = sharedGram is null ? LaggedGram.Build(summary, order, order) : sharedGram.Narrow(summary, order);
        var matrix = Matrix<double>.Build.DenseOfArray(gram.Gram);
        var inverse = matrix.Inverse();
        var beta = inverse * Vector<double>.Build.DenseOfArray(gram.CrossY);
        if (beta.Any(b => !double.IsFinite(b)))
        {
            throw new SeriesException(SeriesProblem.TooShort, $"The least-squares design of order {order} is singular.");
        }

        var phi = new double[order];
        for (var i = 0; i < order; i++)
        {
            phi[i] = beta[i + 1];
        }

        var rss = 0.0;
        foreach (var segment in summary.Segments)
        {
            for (var t = order; t < segment.Length; t++)
            {
                var e = segment[t] - summary.Mean - beta[0];
                for (var i = 1; i <= order; i++)
                {
                    e -= phi[i - 1] * (segment[t - i] - summary.Mean);
                }

                rss += e * e;
            }
        }

        var variance = rss / gram.Rows;
        var errors = new double[order];
        for (var i = 0; i < order; i++)
        {
            errors[i] = Math.Sqrt(inverse[i + 1, i + 1] * variance);
        }

        return ArModel.Create(ArMethod.LeastSquares, summary, summary.Mean, phi, errors, variance) with
        {
            Intercept = beta[0],
        };
    }

    private static double[,] Cholesky(double[,] gram, int maxOrder)
    {
        var size = maxOrder + 1;
        var factor = new double[size, size];
        for (var j = 0; j < size; j++)
        {
            var diagonal = gram[j, j];
            for (var k = 0; k < j; k++)
            {
                diagonal -= factor[j, k] * factor[j, k];
            }

            if (!(diagonal > 0))
            {
                throw new SeriesException(SeriesProblem.TooShort, $"The least-squares design is singular at lag {j}.");
            }

            factor[j, j] = Math.Sqrt(diagonal);
            for (var i = j + 1; i < size; i++)
            {
                var value = gram[i, j];
                for (var k = 0; k < j; k++)
                {
                    value -= factor[i, k] * factor[j, k];
                }

                factor[i, j] = value / factor[j, j];
            }
        }

        return factor;
    }

    private static double[] ForwardSolve(double[,] factor, double[] rhs)
    {
        var z = new double[rhs.Length];
        for (var i = 0; i < rhs.Length; i++)
        {
            var value = rhs[i];
            for (var k = 0; k < i; k++)
            {
                value -= factor[i, k] * z[k];
            }

            z[i] = value / factor[i, i];
        }

        return z;
    }
}
