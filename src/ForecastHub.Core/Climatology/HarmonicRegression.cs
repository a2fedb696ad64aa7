using ForecastHub.Core.Series;
using MathNet.Numerics.LinearAlgebra;

namespace ForecastHub.Core.Climatology;

/// <summary>Least-squares coefficients with R lm's standard errors, sigma and residual df.</summary>
public sealed record RegressionFit(double[] Coefficients, double[] StdErrors, double Sigma, int Df);

/// <summary>
/// Least squares by a thin Householder QR (MathNet), as R lm. <see cref="Gls"/> is the feasible
/// GLS step of a regression with AR(p) errors: rows are pre-whitened by the AR filter inside each
/// segment (t &gt;= p, never across a gap) and solved by the same QR, so the standard errors account
/// for the autocorrelation. Input rules: rows with NaN are not allowed (SeriesException(NonFinite));
/// fewer rows than columns + 1 SeriesException(TooShort); a rank-deficient design (a column that is
/// a combination of the others, e.g. annual terms on a few days) SeriesException(TooShort).
/// </summary>
public static class HarmonicRegression
{
    public static RegressionFit Ols(double[,] x, IReadOnlyList<double> y)
    {
        ArgumentNullException.ThrowIfNull(x);
        ArgumentNullException.ThrowIfNull(y);
        var n = x.GetLength(0);
        var k = x.GetLength(1);
        if (y.Count != n)
        {
            throw new ArgumentException("The design and the response differ in length.", nameof(y));
        }

        if (n < k + 1)
        {
            throw new SeriesException(SeriesProblem.TooShort, $"{n} points are too few for a regression on {k} terms.");
        }

        for (var i = 0; i < n; i++)
        {
            if (!double.IsFinite(y[i]))
            {
                throw new SeriesException(SeriesProblem.NonFinite, $"Point {i} is not finite.");
            }
        }

        var design = Matrix<double>.Build.DenseOfArray(x);
        var response = Vector<double>.Build.Dense(n, i => y[i]);
        var qr = design.QR(MathNet.Numerics.LinearAlgebra.Factorization.QRMethod.Thin);
        var r = qr.R;
        var maxDiagonal = Enumerable.Range(0, k).Max(i => Math.Abs(r[i, i]));
        if (Enumerable.Range(0, k).Any(i => Math.Abs(r[i, i]) <= 1e-9 * maxDiagonal))
        {
            throw new SeriesException(SeriesProblem.TooShort, "The data do not determine every seasonal term (rank-deficient design).");
        }

        var beta = qr.Solve(response);
        var residual = response - design * beta;
        var df = n - k;
        var sigma2 = residual.DotProduct(residual) / df;
        var rInverse = r.Inverse();
        var se = new double[k];
        for (var i = 0; i < k; i++)
        {
            se[i] = Math.Sqrt(sigma2 * rInverse.Row(i).DotProduct(rInverse.Row(i)));
        }

        return new RegressionFit(beta.ToArray(), se, Math.Sqrt(sigma2), df);
    }

    /// <param name="segments">Index runs (start, length) of contiguous rows.</param>
    /// <param name="phi">AR coefficients of the errors.</param>
    public static RegressionFit Gls(double[,] x, IReadOnlyList<double> y, IReadOnlyList<(int Start, int Length)> segments, IReadOnlyList<double> phi)
    {
        ArgumentNullException.ThrowIfNull(x);
        ArgumentNullException.ThrowIfNull(y);
        ArgumentNullException.ThrowIfNull(segments);
        ArgumentNullException.ThrowIfNull(phi);
        var p = phi.Count;
        var k = x.GetLength(1);
        var rows = segments.Sum(s => Math.Max(0, s.Length - p));
        var xw = new double[rows, k];
        var yw = new double[rows];
        var row = 0;
        foreach (var (start, length) in segments)
        {
            for (var t = start + p; t < start + length; t++, row++)
            {
                var v = y[t];
                for (var i = 1; i <= p; i++)
                {
                    v -= phi[i - 1] * y[t - i];
                }

                yw[row] = v;
                for (var c = 0; c < k; c++)
                {
                    var w = x[t, c];
                    for (var i = 1; i <= p; i++)
                    {
                        w -= phi[i - 1] * x[t - i, c];
                    }

                    xw[row, c] = w;
                }
            }
        }

        return Ols(xw, yw);
    }
}
