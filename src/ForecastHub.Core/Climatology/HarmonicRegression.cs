using ForecastHub.Core.Series;
using MathNet.Numerics.LinearAlgebra;

namespace ForecastHub.Core.Climatology;

/// <summary>Least-squares coefficients with R lm's standard errors, sigma and residual df.</summary>
public sealed record RegressionFit(double[] Coefficients, double[] StdErrors, double Sigma, int Df);

/// <summary>
/// Least squares by Householder QR of the augmented matrix [X | y] (as R lm, which uses Householder
/// QR too): the triangle gives R, Q'y and the residual sum of squares without forming Q; the small
/// k x k triangle is inverted with MathNet for the standard errors sigma^2 (R'R)^-1. The design is
/// column-major (one array per term), so each reflection is a vectorised pass over contiguous memory.
/// <see cref="Gls"/> is the feasible GLS step of a regression with AR(p) errors: rows are
/// pre-whitened by the AR filter inside each segment (t &gt;= p, never across a gap) and solved the
/// same way, so the standard errors account for the autocorrelation.
/// Input rules: NaN or infinity in y SeriesException(NonFinite); fewer rows than columns + 1
/// SeriesException(TooShort); a rank-deficient design (e.g. annual terms on a few days)
/// SeriesException(TooShort).
/// </summary>
public static class HarmonicRegression
{
    public static RegressionFit Ols(IReadOnlyList<double[]> columns, IReadOnlyList<double> y)
    {
        ArgumentNullException.ThrowIfNull(columns);
        ArgumentNullException.ThrowIfNull(y);
        var n = y.Count;
        var k = columns.Count;
        if (columns.Any(c => c.Length != n))
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

        var r = TriangulariseInBlocks(columns, y, n);
        var maxDiagonal = Enumerable.Range(0, k).Max(i => Math.Abs(r[i, i]));
        if (Enumerable.Range(0, k).Any(i => !(Math.Abs(r[i, i]) > 1e-9 * maxDiagonal)))
        {
            throw new SeriesException(SeriesProblem.TooShort, "The data do not determine every seasonal term (rank-deficient design).");
        }

        var rk = Matrix<double>.Build.Dense(k, k, (i, j) => r[i, j]);
        var rInverse = rk.Inverse();
        var qty = Vector<double>.Build.Dense(k, i => r[i, k]);
        var beta = rInverse * qty;
        var df = n - k;
        var sigma2 = r[k, k] * r[k, k] / df;
        var se = new double[k];
        for (var i = 0; i < k; i++)
        {
            se[i] = Math.Sqrt(sigma2 * rInverse.Row(i).DotProduct(rInverse.Row(i)));
        }

        return new RegressionFit(beta.ToArray(), se, Math.Sqrt(sigma2), df);
    }

    /// <param name="columns">Column-major design (one array per term).</param>
    /// <param name="segments">Index runs (start, length) of contiguous rows.</param>
    /// <param name="phi">AR coefficients of the errors.</param>
    public static RegressionFit Gls(IReadOnlyList<double[]> columns, IReadOnlyList<double> y, IReadOnlyList<(int Start, int Length)> segments, IReadOnlyList<double> phi)
    {
        ArgumentNullException.ThrowIfNull(columns);
        ArgumentNullException.ThrowIfNull(y);
        ArgumentNullException.ThrowIfNull(segments);
        ArgumentNullException.ThrowIfNull(phi);
        var response = y as double[] ?? [.. y];
        var whitened = columns.Select(c => Prewhiten(c, segments, phi)).ToArray();
        return Ols(whitened, Prewhiten(response, segments, phi));
    }

    /// <summary>e_t = x_t - sum phi_i x_{t-i} for t &gt;= p inside each segment.</summary>
    internal static double[] Prewhiten(double[] x, IReadOnlyList<(int Start, int Length)> segments, IReadOnlyList<double> phi)
    {
        var p = phi.Count;
        var result = new double[segments.Sum(s => Math.Max(0, s.Length - p))];
        var row = 0;
        foreach (var (start, length) in segments)
        {
            var m = length - p;
            if (m <= 0)
            {
                continue;
            }

            var target = result.AsSpan(row, m);
            x.AsSpan(start + p, m).CopyTo(target);
            for (var i = 1; i <= p; i++)
            {
                Axpy(-phi[i - 1], x.AsSpan(start + p - i, m), target);
            }

            row += m;
        }

        return result;
    }

    /// <summary>
    /// Tall-skinny QR: each block of rows of [X | y] is triangularised on its own (so it stays in cache),
    /// then the stacked block triangles are triangularised again. Orthogonal steps only, so the result
    /// is the R of the whole matrix up to row signs (which do not change beta, RSS or (R'R)^-1).
    /// </summary>
    private static double[,] TriangulariseInBlocks(IReadOnlyList<double[]> columns, IReadOnlyList<double> y, int n)
    {
        const int blockRows = 2048;
        var cols = columns.Count + 1;
        var blocks = (n + blockRows - 1) / blockRows;
        var stacked = new double[cols][];
        for (var c = 0; c < cols; c++)
        {
            stacked[c] = new double[blocks * cols];
        }

        var buffer = new double[cols][];
        var response = y as double[] ?? [.. y];
        var stackedRows = 0;
        for (var start = 0; start < n; start += blockRows)
        {
            var length = Math.Min(blockRows, n - start);
            for (var c = 0; c < cols; c++)
            {
                buffer[c] = c < cols - 1 ? columns[c].AsSpan(start, length).ToArray() : response.AsSpan(start, length).ToArray();
            }

            var r = Triangularise(buffer, length);
            var rows = Math.Min(cols, length);
            for (var i = 0; i < rows; i++)
            {
                for (var c = i; c < cols; c++)
                {
                    stacked[c][stackedRows + i] = r[i, c];
                }
            }

            stackedRows += rows;
        }

        return Triangularise(stacked.Select(c => c[..stackedRows]).ToArray(), stackedRows);
    }

    /// <summary>Householder triangularisation in place; returns the (k+1) x (k+1) upper triangle of the augmented matrix.</summary>
    private static double[,] Triangularise(double[][] a, int n)
    {
        var cols = a.Length;
        var r = new double[cols, cols];
        for (var j = 0; j < Math.Min(cols, n); j++)
        {
            var v = a[j].AsSpan(j, n - j);
            var norm = Math.Sqrt(Dot(v, v));
            if (norm == 0)
            {
                r[j, j] = 0;
                continue;
            }

            var alpha = v[0] > 0 ? -norm : norm;
            v[0] -= alpha;
            var vv = Dot(v, v);
            r[j, j] = alpha;
            for (var c = j + 1; c < cols; c++)
            {
                var w = a[c].AsSpan(j, n - j);
                var factor = 2 * Dot(v, w) / vv;
                Axpy(-factor, v, w);
                r[j, c] = w[0];
            }
        }

        return r;
    }

    private static double Dot(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        var width = System.Numerics.Vector<double>.Count;
        var acc = System.Numerics.Vector<double>.Zero;
        var i = 0;
        for (; i <= x.Length - width; i += width)
        {
            acc += new System.Numerics.Vector<double>(x[i..]) * new System.Numerics.Vector<double>(y[i..]);
        }

        var sum = System.Numerics.Vector.Sum(acc);
        for (; i < x.Length; i++)
        {
            sum += x[i] * y[i];
        }

        return sum;
    }

    private static void Axpy(double alpha, ReadOnlySpan<double> x, Span<double> y)
    {
        var width = System.Numerics.Vector<double>.Count;
        var a = new System.Numerics.Vector<double>(alpha);
        var i = 0;
        for (; i <= x.Length - width; i += width)
        {
            (new System.Numerics.Vector<double>(y[i..]) + a * new System.Numerics.Vector<double>(x[i..])).CopyTo(y[i..]);
        }

        for (; i < x.Length; i++)
        {
            y[i] += alpha * x[i];
        }
    }
}
