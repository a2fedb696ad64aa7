using System.Runtime.InteropServices;
using ForecastHub.Core.Linear;
using ForecastHub.Core.Series;
using MathNet.Numerics.LinearAlgebra;
using Lanes = System.Numerics.Vector<double>;

namespace ForecastHub.Core.Climatology;

/// <summary>Least-squares coefficients with R lm's standard errors, sigma and residual df.</summary>
public sealed record RegressionFit(double[] Coefficients, double[] StdErrors, double Sigma, int Df);

/// <summary>
/// Least squares by Householder QR of the augmented matrix [X | y] (as R lm, which uses Householder
/// QR too), built block by block (<see cref="TallSkinnyQr"/>): the triangle gives R, Q'y and the
/// residual sum of squares without forming Q; the small
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
        var response = y as double[] ?? [.. y];
        RequireLength(columns, response.Length, exact: true);
        return OlsOnLeadingRows(columns, response);
    }

    /// <summary>OLS on the first <c>response.Length</c> rows of the columns, which may run longer: a calibration
    /// fold's fit reads the leading rows of the window's design instead of a copy of them.</summary>
    internal static RegressionFit OlsOnLeadingRows(IReadOnlyList<double[]> columns, double[] response)
    {
        var n = response.Length;
        var k = columns.Count;
        RequireLength(columns, n, exact: false);
        RequireRows(n, k);
        RequireFinite(response);
        var qr = new TallSkinnyQr(k + 1);
        for (var start = 0; start < n; start += TallSkinnyQr.BlockRows)
        {
            var length = Math.Min(TallSkinnyQr.BlockRows, n - start);
            for (var c = 0; c < k; c++)
            {
                columns[c].AsSpan(start, length).CopyTo(qr.Block(c));
            }

            response.AsSpan(start, length).CopyTo(qr.Block(k));
            qr.Commit(length);
        }

        return Solve(qr);
    }

    private static void RequireLength(IReadOnlyList<double[]> columns, int n, bool exact)
    {
        if (columns.Any(column => exact ? column.Length != n : column.Length < n))
        {
            throw new ArgumentException("The design and the response differ in length.", nameof(columns));
        }
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
        RequireLength(columns, response.Length, exact: true);
        return GlsOnLeadingRows(columns, response, segments, phi);
    }

    /// <summary>GLS on the first <c>response.Length</c> rows of the columns, which may run longer (see <see cref="OlsOnLeadingRows"/>).</summary>
    internal static RegressionFit GlsOnLeadingRows(IReadOnlyList<double[]> columns, double[] response, IReadOnlyList<(int Start, int Length)> segments, IReadOnlyList<double> phi)
    {
        var k = columns.Count;
        var p = phi.Count;
        var coefficients = phi.ToArray();
        RequireLength(columns, response.Length, exact: false);
        RequireRows(segments.Sum(s => Math.Max(0, s.Length - p)), k);
        RequireFinite(response);

        // Pre-whitened rows go straight into the QR's block buffer: the whitened design is never stored.
        var qr = new TallSkinnyQr(k + 1);
        foreach (var (start, length) in segments)
        {
            for (var t = start + p; t < start + length; t += TallSkinnyQr.BlockRows)
            {
                var count = Math.Min(TallSkinnyQr.BlockRows, start + length - t);
                for (var c = 0; c <= k; c++)
                {
                    Prewhiten(c < k ? columns[c] : response, t, count, coefficients, qr.Block(c));
                }

                qr.Commit(count);
            }
        }

        return Solve(qr);
    }

    /// <summary>target_i = x_{t+i} - sum_j phi_j x_{t+i-j} for i &lt; count (the AR filter; t - p must lie in the segment).
    /// Each element takes its terms in lag order (x + (-phi_1) x_1 + (-phi_2) x_2 ...), as one axpy per lag would, so
    /// the result is the same bit for bit; four rows of vectors at a time are summed in registers and stored once.</summary>
    internal static void Prewhiten(double[] x, int t, int count, ReadOnlySpan<double> phi, Span<double> target)
    {
        var p = phi.Length;
        var width = Lanes.Count;
        Span<double> minusPhi = stackalloc double[p];
        for (var j = 0; j < p; j++)
        {
            minusPhi[j] = -phi[j];
        }

        var i = 0;
        if (System.Numerics.Vector.IsHardwareAccelerated)
        {
            var row = MemoryMarshal.Cast<double, Lanes>(target[..count]);
            for (; i + (4 * width) <= count; i += 4 * width)
            {
                var at = t + i;
                var a0 = new Lanes(x, at);
                var a1 = new Lanes(x, at + width);
                var a2 = new Lanes(x, at + (2 * width));
                var a3 = new Lanes(x, at + (3 * width));
                for (var j = 1; j <= p; j++)
                {
                    var c = new Lanes(minusPhi[j - 1]);
                    var from = at - j;
                    a0 += c * new Lanes(x, from);
                    a1 += c * new Lanes(x, from + width);
                    a2 += c * new Lanes(x, from + (2 * width));
                    a3 += c * new Lanes(x, from + (3 * width));
                }

                var v = i / width;
                (row[v], row[v + 1], row[v + 2], row[v + 3]) = (a0, a1, a2, a3);
            }

            for (; i + width <= count; i += width)
            {
                var a = new Lanes(x, t + i);
                for (var j = 1; j <= p; j++)
                {
                    a += new Lanes(minusPhi[j - 1]) * new Lanes(x, t + i - j);
                }

                row[i / width] = a;
            }
        }

        for (; i < count; i++)
        {
            var sum = x[t + i];
            for (var j = 1; j <= p; j++)
            {
                sum += minusPhi[j - 1] * x[t + i - j];
            }

            target[i] = sum;
        }
    }

    /// <summary>beta, R lm's standard errors and sigma from the triangle of [X | y] (last column y).</summary>
    internal static RegressionFit Solve(TallSkinnyQr qr)
    {
        var r = qr.Triangle();
        var k = qr.Columns - 1;
        var maxDiagonal = Enumerable.Range(0, k).Max(i => Math.Abs(r[i, i]));
        if (Enumerable.Range(0, k).Any(i => !(Math.Abs(r[i, i]) > 1e-9 * maxDiagonal)))
        {
            throw new SeriesException(SeriesProblem.TooShort, "The data do not determine every seasonal term (rank-deficient design).");
        }

        var rk = Matrix<double>.Build.Dense(k, k, (i, j) => r[i, j]);
        var rInverse = rk.Inverse();
        var qty = Vector<double>.Build.Dense(k, i => r[i, k]);
        var beta = rInverse * qty;
        var df = qr.Rows - k;
        var sigma2 = r[k, k] * r[k, k] / df;
        var se = new double[k];
        for (var i = 0; i < k; i++)
        {
            se[i] = Math.Sqrt(sigma2 * rInverse.Row(i).DotProduct(rInverse.Row(i)));
        }

        return new RegressionFit(beta.ToArray(), se, Math.Sqrt(sigma2), df);
    }

    private static void RequireRows(int n, int k)
    {
        if (n < k + 1)
        {
            throw new SeriesException(SeriesProblem.TooShort, $"{n} points are too few for a regression on {k} terms.");
        }
    }

    private static void RequireFinite(double[] y)
    {
        for (var i = 0; i < y.Length; i++)
        {
            if (!double.IsFinite(y[i]))
            {
                throw new SeriesException(SeriesProblem.NonFinite, $"Point {i} is not finite.");
            }
        }
    }
}
