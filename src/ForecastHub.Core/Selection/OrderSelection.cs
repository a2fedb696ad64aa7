using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Correlation;
using ForecastHub.Core.Series;

namespace ForecastHub.Core.Selection;

/// <summary>
/// Chooses the AR order by a policy and fits it. Criteria per method (docs/numerics.md):
/// Yule-Walker and Burg AIC_p = n log(v_p) + 2p + 2 (R ar's $aic before subtracting its minimum);
/// least squares the same form on one common sample of rows; maximum likelihood
/// AIC = -2 logL + 2(p + 2) (R arima). AICc = AIC + 2k(k + 1)/(m - k - 1), BIC = AIC - 2k + k log m,
/// with k the criterion's parameter count (p + 1, or p + 2 for ML) and m the criteria sample size.
/// Ties go to the lower order. Input rules: as <see cref="ArFit"/>; fewer than 3 points throws
/// SeriesException(TooShort); a negative setting ArgumentOutOfRangeException.
/// </summary>
public static class OrderSelection
{
    public static OrderSelectionResult Select(
        IReadOnlyList<double[]> segments,
        ArMethod method,
        OrderPolicy policy,
        int maxOrderSetting,
        double alpha = 0.05,
        BurgVariance burgVariance = BurgVariance.Recursion)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(maxOrderSetting);
        var summary = SegmentSummary.Of(segments).RequireVariance();
        if (summary.Count < 3)
        {
            throw new SeriesException(SeriesProblem.TooShort, $"Order selection needs at least 3 points; the series has {summary.Count}.");
        }

        var n = summary.Count;
        var maxOrder = Math.Min(maxOrderSetting, (int)Math.Floor(10 * Math.Log10(n)));
        while (maxOrder > 0 && !Supports(summary, maxOrder, method))
        {
            maxOrder--;
        }

        var band = Autocorrelation.Band(n, alpha);
        double[] autocovariances = [];
        LevinsonPath? sample = null;
        Candidates? candidates = null;
        // The sample PACF (the band's cutoff) and the candidates of every method but Yule-Walker, which is built on that
        // sample, need nothing of each other: side by side.
        SideBySide.Run(
            () =>
            {
                autocovariances = Autocorrelation.Autocovariance(summary, maxOrder);
                sample = DurbinLevinson.Run(autocovariances, maxOrder);
            },
            () => candidates = method == ArMethod.YuleWalker ? null : Candidates.For(summary, method, maxOrder, burgVariance, sample: null, autocovariances: null));
        candidates ??= Candidates.For(summary, method, maxOrder, burgVariance, sample, autocovariances);
        var pacf = new LagValue[maxOrder];
        var cutoff = 0;
        for (var k = 1; k <= maxOrder; k++)
        {
            pacf[k - 1] = new LagValue(k, sample!.Partials[k - 1]);
            if (Math.Abs(sample.Partials[k - 1]) > band)
            {
                cutoff = k;
            }
        }

        var chosen = policy switch
        {
            OrderPolicy.PacfAic => ArgMin(candidates.Criteria, cutoff, c => c.Aic),
            OrderPolicy.Aic => ArgMin(candidates.Criteria, maxOrder, c => c.Aic),
            OrderPolicy.Aicc => ArgMin(candidates.Criteria, maxOrder, c => c.Aicc),
            OrderPolicy.Bic => ArgMin(candidates.Criteria, maxOrder, c => c.Bic),
            OrderPolicy.Pacf => cutoff,
            _ => throw new ArgumentOutOfRangeException(nameof(policy), policy, "Unknown order policy."),
        };

        return new OrderSelectionResult
        {
            Policy = policy,
            Method = method,
            MaxOrder = maxOrder,
            Band = band,
            PacfCutoff = cutoff,
            Pacf = pacf,
            Criteria = candidates.Criteria,
            CriteriaSample = candidates.Sample,
            CriteriaSampleSize = candidates.SampleSize,
            ChosenOrder = chosen,
            Model = candidates.ModelOf(chosen),
        };
    }

    public static OrderSelectionResult Select(
        double[] series,
        ArMethod method,
        OrderPolicy policy,
        int maxOrderSetting,
        double alpha = 0.05,
        BurgVariance burgVariance = BurgVariance.Recursion)
        => Select([series], method, policy, maxOrderSetting, alpha, burgVariance);

    /// <summary>AIC/AICc/BIC from a log-variance-type term: base = m log(v) (+ constants) and k parameters.</summary>
    internal static OrderCriteria Criteria(int order, double aic, int parameters, int sampleSize)
    {
        var k = parameters;
        var m = (double)sampleSize;
        var aicc = m - k - 1 > 0 ? aic + 2.0 * k * (k + 1) / (m - k - 1) : double.MaxValue;
        var bic = aic - 2.0 * k + k * Math.Log(m);
        return new OrderCriteria(order, aic, aicc, bic);
    }

    private static bool Supports(SegmentSummary summary, int maxOrder, ArMethod method)
    {
        if (!ArFit.CanFit(summary, maxOrder, method))
        {
            return false;
        }

        // Least squares compares every order on the rows t >= maxOrder, so those rows must fit maxOrder too.
        return method != ArMethod.LeastSquares || summary.LaggedRows(maxOrder) >= maxOrder + 2;
    }

    private static int ArgMin(IReadOnlyList<OrderCriteria> criteria, int upTo, Func<OrderCriteria, double> value)
    {
        var best = 0;
        for (var order = 1; order <= upTo; order++)
        {
            if (value(criteria[order]) < value(criteria[best]))
            {
                best = order;
            }
        }

        return best;
    }
}
