using System.Buffers;
using System.Numerics;
using ForecastHub.Core.Correlation;
using ForecastHub.Core.Series;

namespace ForecastHub.Core.Autoregression;

/// <summary>
/// Burg (R ar.burg, C routine burg): forward/backward error products are summed over all
/// segments, so one set of reflection coefficients serves every segment without bridging gaps.
/// </summary>
internal static class BurgEstimator
{
    /// <summary>Rows per chunk of the update pass: the chunk's u and v stay in L1 for the sums that follow.</summary>
    private const int ChunkRows = 1024;

    /// <remarks>
    /// Storage: v[t] = b_{p-1}(t) and u[t] = f_{p-1}(t - 1) (u shifted by one, length n + 1), so the order-p
    /// update u_p(t) = u_{p-1}(t-1) - phi v(t), v_p(t) = v(t) - phi u_{p-1}(t-1) reads u[t], v[t] and writes
    /// v[t], u[t + 1]: element-wise and vectorisable when run from the top down, and the next order's
    /// sums are sum v[t] u[t] and sum v[t]^2 + u[t]^2 over t &gt;= p + 1, in the same places.
    /// </remarks>
    public static LevinsonPath Path(SegmentSummary summary, int maxOrder, BurgVariance varianceMethod)
    {
        var segments = summary.Segments;
        var forward = new double[segments.Count][];
        var backward = new double[segments.Count][];
        var sumSquares = 0.0;
        for (var s = 0; s < segments.Count; s++)
        {
            var x = segments[s];
            var n = x.Length;
            // Pooled scratch (a fit runs Burg on long series twice); only the first n + 1 and n elements are used.
            var u = ArrayPool<double>.Shared.Rent(n + 1);
            var v = ArrayPool<double>.Shared.Rent(n);
            u[0] = 0;
            for (var t = 0; t < n; t++)
            {
                // R stores the series reversed; kept so the recursion runs over the same arrangement.
                v[t] = u[t + 1] = x[n - 1 - t] - summary.Mean;
                sumSquares += v[t] * v[t];
            }

            forward[s] = u;
            backward[s] = v;
        }

        var coefficients = new double[maxOrder + 1][];
        var recursion = new double[maxOrder + 1];
        var energy = new double[maxOrder + 1];
        var partials = new double[maxOrder];
        coefficients[0] = [];
        recursion[0] = energy[0] = sumSquares / summary.Count;
        var withEnergy = varianceMethod == BurgVariance.ErrorEnergy;

        // Order-1 sums; later orders get theirs from the update pass of the order before.
        var numerator = 0.0;
        var denominator = 0.0;
        for (var s = 0; s < segments.Count; s++)
        {
            var (num, den) = Sums(backward[s], forward[s], 1, segments[s].Length);
            numerator += num;
            denominator += den;
        }

        for (var p = 1; p <= maxOrder; p++)
        {
            if (!(denominator > 0))
            {
                throw new SeriesException(SeriesProblem.TooShort, $"No segment is long enough for a Burg fit of order {p}.");
            }

            var phi = 2 * numerator / denominator;
            coefficients[p] = DurbinLevinson.StepUp(coefficients[p - 1], phi);
            partials[p - 1] = phi;

            var errorSum = 0.0;
            var rows = 0;
            numerator = 0.0;
            denominator = 0.0;
            for (var s = 0; s < segments.Count; s++)
            {
                var u = forward[s];
                var v = backward[s];
                var n = segments[s].Length;
                var (err, num, den) = n >= 2 * MinRowsPerHalf
                    ? SweepInTwo(u, v, p, n, phi, withEnergy)
                    : Sweep(u, v, p, n - 1, n, phi, withEnergy);
                errorSum += err;
                numerator += num;
                denominator += den;
                rows += Math.Max(0, n - p);
            }

            recursion[p] = recursion[p - 1] * (1 - phi * phi);
            energy[p] = errorSum / (2.0 * rows);
        }

        for (var s = 0; s < segments.Count; s++)
        {
            ArrayPool<double>.Shared.Return(forward[s]);
            ArrayPool<double>.Shared.Return(backward[s]);
        }

        return new LevinsonPath(coefficients, withEnergy ? energy : recursion, partials);
    }

    /// <summary>Rows per half below which one thread sweeps a segment alone (common practice, no source: a half must carry more
    /// work than handing it to another thread costs, about 10 microseconds an order).</summary>
    internal const int MinRowsPerHalf = 16_384;

    /// <summary>
    /// The order-p update of t = hi down to lo in chunks from the top down, and the next order's sums over
    /// [chunk lo + 1, min(chunk hi + 2, sumsTo)). After a chunk [lo, hi] is updated, v[lo..hi] and u[lo+1..hi+1] are final
    /// (v[hi+1] from the chunk above), so the sums over it are taken while it is in cache.
    /// </summary>
    private static (double Error, double Numerator, double Denominator) Sweep(double[] u, double[] v, int lo, int hi, int sumsTo, double phi, bool withEnergy)
    {
        double error = 0, numerator = 0, denominator = 0;
        for (; hi >= lo; hi -= ChunkRows)
        {
            var chunkLo = Math.Max(lo, hi - ChunkRows + 1);
            error += Update(u, v, chunkLo, hi, phi, withEnergy);
            var (num, den) = Sums(v, u, chunkLo + 1, Math.Min(hi + 2, sumsTo));
            numerator += num;
            denominator += den;
        }

        return (error, numerator, denominator);
    }

    /// <summary>
    /// <see cref="Sweep"/> of a long segment as two halves side by side, split at m: the upper half updates t in [m, n), the lower
    /// one t in [p, m). The update of t writes u[t + 1], which the update of t + 1 reads first, so the lower half holds its write
    /// of u[m] back until the upper one has read u[m]; the sum term of t = m, which needs both halves, is added last. Each half's
    /// u and v fit one core's cache. The halves' sums are added in a fixed order, so any machine gives the same bits (not those
    /// of one sweep, whose terms are added in another order).
    /// </summary>
    private static (double Error, double Numerator, double Denominator) SweepInTwo(double[] u, double[] v, int p, int n, double phi, bool withEnergy)
    {
        var m = n / 2;
        (double Error, double Numerator, double Denominator) lower = default, upper = default;
        var heldU = 0.0;
        Parallel.Invoke(
            () => upper = Sweep(u, v, m, n - 1, n, phi, withEnergy),
            () =>
            {
                // t = m - 1 by hand, its u[m] held back; then the rest of the lower half, whose sums stop below m.
                var a = u[m - 1];
                var b = v[m - 1];
                heldU = a - (phi * b);
                var vNew = b - (phi * a);
                v[m - 1] = vNew;
                var (error, num, den) = Sweep(u, v, p, m - 2, m, phi, withEnergy);
                lower = (withEnergy ? error + ((vNew * vNew) + (heldU * heldU)) : 0, num, den);
            });
        u[m] = heldU;
        return (
            lower.Error + upper.Error,
            lower.Numerator + upper.Numerator + (v[m] * u[m]),
            lower.Denominator + upper.Denominator + ((v[m] * v[m]) + (u[m] * u[m])));
    }

    /// <summary>Order update for t = hi down to lo (see the storage remark); returns sum of the new squared errors when asked.</summary>
    private static double Update(double[] u, double[] v, int lo, int hi, double phi, bool withEnergy)
    {
        var width = Vector<double>.Count;
        var k = new Vector<double>(phi);
        var energy = Vector<double>.Zero;
        var t = hi - width + 1;
        for (; t >= lo; t -= width)
        {
            // Loads before stores: u[t+1 .. t+width] overlaps only this block's own reads and the block above's.
            var a = new Vector<double>(u, t);
            var b = new Vector<double>(v, t);
            var uNew = a - (k * b);
            var vNew = b - (k * a);
            vNew.CopyTo(v, t);
            uNew.CopyTo(u, t + 1);
            if (withEnergy)
            {
                energy += (vNew * vNew) + (uNew * uNew);
            }
        }

        var sum = Vector.Sum(energy);
        for (var i = t + width - 1; i >= lo; i--)
        {
            var a = u[i];
            var uNew = a - (phi * v[i]);
            var vNew = v[i] - (phi * a);
            v[i] = vNew;
            u[i + 1] = uNew;
            sum += (vNew * vNew) + (uNew * uNew);
        }

        return withEnergy ? sum : 0;
    }

    /// <summary>sum v[t] u[t] and sum v[t]^2 + u[t]^2 over t in [from, to).</summary>
    private static (double Numerator, double Denominator) Sums(double[] v, double[] u, int from, int to)
    {
        if (to <= from)
        {
            return (0, 0);
        }

        var width = Vector<double>.Count;
        var num0 = Vector<double>.Zero;
        var num1 = Vector<double>.Zero;
        var den0 = Vector<double>.Zero;
        var den1 = Vector<double>.Zero;
        var t = from;
        for (; t + (2 * width) <= to; t += 2 * width)
        {
            var v0 = new Vector<double>(v, t);
            var u0 = new Vector<double>(u, t);
            var v1 = new Vector<double>(v, t + width);
            var u1 = new Vector<double>(u, t + width);
            num0 += v0 * u0;
            num1 += v1 * u1;
            den0 += (v0 * v0) + (u0 * u0);
            den1 += (v1 * v1) + (u1 * u1);
        }

        var numerator = Vector.Sum(num0 + num1);
        var denominator = Vector.Sum(den0 + den1);
        for (; t < to; t++)
        {
            numerator += v[t] * u[t];
            denominator += (v[t] * v[t]) + (u[t] * u[t]);
        }

        return (numerator, denominator);
    }

    /// <summary>R 4.2 reports Burg's var.pred without the n/(n-p-1) factor; standard errors as R asy.var.coef.</summary>
    public static ArModel Model(SegmentSummary summary, LevinsonPath path, int order, BurgVariance varianceMethod)
    {
        var variance = path.Variances[order];
        var autocovariances = Autocorrelation.Autocovariance(summary, order);
        var coefficients = (double[])path.Coefficients[order].Clone();
        var errors = YuleWalkerEstimator.AsymptoticStandardErrors(autocovariances, order, variance, summary.Count);
        return ArModel.Create(ArMethod.Burg, summary, summary.Mean, coefficients, errors, variance) with
        {
            BurgVariance = varianceMethod,
        };
    }
}
