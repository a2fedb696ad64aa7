using System.Numerics;
using ForecastHub.Core.Series;

namespace ForecastHub.Core.Autoregression;

/// <summary>
/// Fits an AR(p) of a given order by one of the <see cref="ArMethod"/>s, on a series given as
/// contiguous segments (a long gap splits the series; no estimator bridges it). With one segment
/// every number equals R's (see docs/numerics.md).
/// Input rules: null throws ArgumentNullException; a negative order ArgumentOutOfRangeException;
/// no points SeriesException(Empty); NaN or infinity SeriesException(NonFinite); a constant series
/// SeriesException(Constant); fewer than p + 2 points (Burg and least squares: fewer than p + 2
/// rows t &gt;= p summed over segments) SeriesException(TooShort). A near-unit-root series is fitted
/// and reported through <see cref="ArModel.Stationarity"/>.
/// </summary>
public static class ArFit
{
    public static ArModel Fit(
        IReadOnlyList<double[]> segments,
        int order,
        ArMethod method,
        BurgVariance burgVariance = BurgVariance.Recursion)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(order);
        var summary = SegmentSummary.Of(segments).RequireVariance();
        RequireLength(summary, order, method);
        switch (method)
        {
            case ArMethod.YuleWalker:
                var path = YuleWalkerEstimator.Path(summary, order, out var autocovariances);
                return YuleWalkerEstimator.Model(summary, path, autocovariances, order);
            case ArMethod.Burg:
                return BurgEstimator.Model(summary, BurgEstimator.Path(summary, order, burgVariance), order, burgVariance);
            case ArMethod.LeastSquares:
                return LeastSquaresEstimator.Fit(summary, order);
            case ArMethod.MaxLikelihood:
                return MaxLikelihoodEstimator.Fit(summary, order);
            default:
                throw new ArgumentOutOfRangeException(nameof(method), method, "Unknown AR method.");
        }
    }

    public static ArModel Fit(double[] series, int order, ArMethod method, BurgVariance burgVariance = BurgVariance.Recursion)
        => Fit([series], order, method, burgVariance);

    /// <summary>
    /// One-step residuals e_t = (x_t - Mean) - Intercept - sum phi_i (x_{t-i} - Mean) for t &gt;= p of
    /// each segment (R's ar residuals without the leading NAs); a segment of p points or fewer
    /// gives an empty array. NaN or infinity throws SeriesException(NonFinite); null throws.
    /// </summary>
    public static IReadOnlyList<double[]> Residuals(ArModel model, IReadOnlyList<double[]> segments)
    {
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(segments);
        var p = model.Order;
        var phi = model.Coefficients.ToArray();
        var result = new double[segments.Count][];
        for (var s = 0; s < segments.Count; s++)
        {
            var x = segments[s] ?? throw new ArgumentException($"Segment {s} is null.", nameof(segments));
            var residuals = new double[Math.Max(0, x.Length - p)];
            Filter(x, p, phi, model.Mean, model.Intercept, residuals);
            var bad = Array.FindIndex(residuals, e => !double.IsFinite(e));
            if (bad >= 0)
            {
                throw new SeriesException(SeriesProblem.NonFinite, $"Segment {s} has a non-finite value near index {bad + p}.");
            }

            result[s] = residuals;
        }

        return result;
    }

    /// <summary>e[t - p] = x[t] - mean - intercept - sum_i phi_i (x[t - i] - mean) for t &gt;= p: each element's terms in the same
    /// order in vector lanes as one at a time, so the same result bit for bit.</summary>
    private static void Filter(double[] x, int p, double[] phi, double mean, double intercept, double[] residuals)
    {
        var width = Vector<double>.Count;
        var t = p;
        if (Vector.IsHardwareAccelerated)
        {
            var m = new Vector<double>(mean);
            var c = new Vector<double>(intercept);
            for (; t + width <= x.Length; t += width)
            {
                var e = new Vector<double>(x, t) - m - c;
                for (var i = 1; i <= p; i++)
                {
                    e -= new Vector<double>(phi[i - 1]) * (new Vector<double>(x, t - i) - m);
                }

                e.CopyTo(residuals, t - p);
            }
        }

        for (; t < x.Length; t++)
        {
            var e = x[t] - mean - intercept;
            for (var i = 1; i <= p; i++)
            {
                e -= phi[i - 1] * (x[t - i] - mean);
            }

            residuals[t - p] = e;
        }
    }

    /// <summary>True when an order-p fit by this method has enough data (see the class rules).</summary>
    internal static bool CanFit(SegmentSummary summary, int order, ArMethod method)
    {
        if (summary.Count < order + 2)
        {
            return false;
        }

        return method is ArMethod.YuleWalker or ArMethod.MaxLikelihood || summary.LaggedRows(order) >= order + 2;
    }

    private static void RequireLength(SegmentSummary summary, int order, ArMethod method)
    {
        if (!CanFit(summary, order, method))
        {
            throw new SeriesException(
                SeriesProblem.TooShort,
                $"{summary.Count} points in {summary.Segments.Count} segment(s) are too few for an AR({order}) fit by {method}.");
        }
    }
}
