using ForecastHub.Core.Correlation;
using ForecastHub.Core.Series;

namespace ForecastHub.Core.Autoregression;

/// <summary>
/// Burg (R ar.burg, C routine burg): forward/backward error products are summed over all
/// segments, so one set of reflection coefficients serves every segment without bridging gaps.
/// </summary>
internal static class BurgEstimator
{
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
            var u = new double[n];
            var v = new double[n];
            for (var t = 0; t < n; t++)
            {
                // R stores the series reversed; kept so sums run in the same order.
                u[t] = v[t] = x[n - 1 - t] - summary.Mean;
                sumSquares += u[t] * u[t];
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
        // Order-1 sums; later orders get theirs from the update pass of the order before.
        var numerator = 0.0;
        var denominator = 0.0;
        for (var s = 0; s < segments.Count; s++)
        {
            var u = forward[s];
            var v = backward[s];
            for (var t = 1; t < u.Length; t++)
            {
                numerator += v[t] * u[t - 1];
                denominator += v[t] * v[t] + u[t - 1] * u[t - 1];
            }
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

                // Descending t keeps u[t - 1] at its previous-order value, as R's copy u0 does; once u[t]
                // is updated, v[t + 1] and u[t] are final for order p and give the order-(p+1) sums at t + 1.
                for (var t = u.Length - 1; t >= p; t--)
                {
                    var uPrevious = u[t - 1];
                    var uNew = uPrevious - phi * v[t];
                    var vNew = v[t] - phi * uPrevious;
                    u[t] = uNew;
                    v[t] = vNew;
                    errorSum += vNew * vNew + uNew * uNew;
                    if (t + 1 < u.Length)
                    {
                        var vNext = v[t + 1];
                        numerator += vNext * uNew;
                        denominator += vNext * vNext + uNew * uNew;
                    }
                }

                rows += Math.Max(0, u.Length - p);
            }

            recursion[p] = recursion[p - 1] * (1 - phi * phi);
            energy[p] = errorSum / (2.0 * rows);
        }

        return new LevinsonPath(coefficients, varianceMethod == BurgVariance.ErrorEnergy ? energy : recursion, partials);
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
