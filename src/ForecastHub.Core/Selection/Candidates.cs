using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Correlation;
using ForecastHub.Core.Series;

namespace ForecastHub.Core.Selection;

/// <summary>Criteria for orders 0..maxOrder of one method, and the fitted model of any of those orders.</summary>
internal sealed class Candidates
{
    private readonly Func<int, ArModel> modelOf;

    private Candidates(IReadOnlyList<OrderCriteria> criteria, CriteriaSample sample, int sampleSize, Func<int, ArModel> modelOf)
    {
        Criteria = criteria;
        Sample = sample;
        SampleSize = sampleSize;
        this.modelOf = modelOf;
    }

    public IReadOnlyList<OrderCriteria> Criteria { get; }

    public CriteriaSample Sample { get; }

    public int SampleSize { get; }

    public ArModel ModelOf(int order) => modelOf(order);

    public static Candidates For(
        SegmentSummary summary,
        ArMethod method,
        int maxOrder,
        BurgVariance burgVariance,
        LevinsonPath? sample,
        double[]? autocovariances)
    {
        var n = summary.Count;
        switch (method)
        {
            case ArMethod.YuleWalker:
                ArgumentNullException.ThrowIfNull(sample);
                ArgumentNullException.ThrowIfNull(autocovariances);
                return FromVariances(sample.Variances, n, CriteriaSample.AllPoints, order => YuleWalkerEstimator.Model(summary, sample, autocovariances, order));
            case ArMethod.Burg:
                var burg = BurgEstimator.Path(summary, maxOrder, burgVariance);
                return FromVariances(burg.Variances, n, CriteriaSample.AllPoints, order => BurgEstimator.Model(summary, burg, order, burgVariance));
            case ArMethod.LeastSquares:
                var common = LaggedGram.Build(summary, maxOrder, maxOrder);
                var variances = LeastSquaresEstimator.CommonSampleVariances(common);
                return FromVariances(variances, common.Rows, CriteriaSample.CommonRows, order => LeastSquaresEstimator.Fit(summary, order, common));
            case ArMethod.MaxLikelihood:
                var criteria = new OrderCriteria[maxOrder + 1];
                var gram = LaggedGram.Build(summary, maxOrder, maxOrder);
                for (var order = 0; order <= maxOrder; order++)
                {
                    // Standard errors only for the chosen order (below): the Hessian dominates the cost.
                    var fit = MaxLikelihoodEstimator.Fit(summary, order, withStandardErrors: false, gram);
                    var aic = -2 * fit.LogLikelihood!.Value + 2.0 * (order + 2);
                    criteria[order] = OrderSelection.Criteria(order, aic, order + 2, n);
                }

                return new Candidates(criteria, CriteriaSample.ExactLikelihood, n, order => MaxLikelihoodEstimator.Fit(summary, order));
            default:
                throw new ArgumentOutOfRangeException(nameof(method), method, "Unknown AR method.");
        }
    }

    /// <summary>AIC_p = m log(v_p) + 2p + 2 (R ar convention, demeaned).</summary>
    private static Candidates FromVariances(double[] variances, int sampleSize, CriteriaSample sample, Func<int, ArModel> modelOf)
    {
        var criteria = new OrderCriteria[variances.Length];
        for (var order = 0; order < variances.Length; order++)
        {
            var aic = sampleSize * Math.Log(variances[order]) + 2.0 * order + 2;
            criteria[order] = OrderSelection.Criteria(order, aic, order + 1, sampleSize);
        }

        return new Candidates(criteria, sample, sampleSize, modelOf);
    }
}
