using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Correlation;
using ForecastHub.Core.Selection;
using ForecastHub.Core.Tests.Support;

namespace ForecastHub.Core.Tests.Autoregression;

public sealed class SegmentTests
{
    [Fact]
    public void PooledAutocovarianceUsesOneMeanAndNoPairAcrossTheGap()
    {
        double[][] segments = [[1, 2, 3], [10, 11]];

        var c = Autocorrelation.Autocovariance(segments, 1);

        // By hand: mean 27/5, divisor n = 5, lag-1 pairs (1,2), (2,3), (10,11) only.
        var m = 27.0 / 5;
        var c0 = (Sq(1 - m) + Sq(2 - m) + Sq(3 - m) + Sq(10 - m) + Sq(11 - m)) / 5;
        var c1 = ((1 - m) * (2 - m) + (2 - m) * (3 - m) + (10 - m) * (11 - m)) / 5;
        Assert.Equal(c0, c[0], 1e-12);
        Assert.Equal(c1, c[1], 1e-12);
    }

    [Theory]
    [MemberData(nameof(SomeAr.Methods), MemberType = typeof(SomeAr))]
    public void SwappingTheSegmentsLeavesTheFitUnchanged(ArMethod method)
    {
        // Bridging a gap would pair the end of one segment with the start of the next, which the order changes.
        var first = SomeAr.ArSeries(300, [0.6, -0.2], seed: 3);
        var second = SomeAr.ArSeries(200, [0.6, -0.2], mean: 2, seed: 4);

        var forward = ArFit.Fit([first, second], 2, method);
        var swapped = ArFit.Fit([second, first], 2, method);
        var joined = ArFit.Fit([[.. first, .. second]], 2, method);

        var tolerance = method == ArMethod.MaxLikelihood ? 1e-6 : 1e-10;
        Close.All(forward.Coefficients, swapped.Coefficients, tolerance, "coefficients");
        Close.Equal(forward.InnovationVariance, swapped.InnovationVariance, tolerance, "variance");
        Assert.Equal(500, forward.SampleSize);
        Assert.Equal(2, forward.SegmentCount);
        Assert.NotEqual(joined.Coefficients[0], forward.Coefficients[0]);
    }

    [Fact]
    public void LeastSquaresCriteriaUseRowsAfterMaxOrderInEverySegment()
    {
        double[][] segments = [SomeAr.ArSeries(120, [0.5], seed: 5), SomeAr.ArSeries(80, [0.5], seed: 6)];

        var result = OrderSelection.Select(segments, ArMethod.LeastSquares, OrderPolicy.Aic, 6);

        Assert.Equal(6, result.MaxOrder);
        Assert.Equal(CriteriaSample.CommonRows, result.CriteriaSample);
        Assert.Equal(120 - 6 + 80 - 6, result.CriteriaSampleSize);
    }

    [Fact]
    public void MaxLikelihoodCriteriaOnSegmentsEqualTheSeparateFitsOfEachOrder()
    {
        // Selection shares one lagged pass over rows t >= maxOrder and adds the earlier rows per order.
        double[][] segments = [SomeAr.ArSeries(150, [0.5, -0.3], seed: 8), SomeAr.ArSeries(7, [0.5, -0.3], seed: 9), SomeAr.ArSeries(90, [0.5, -0.3], seed: 10)];

        var result = OrderSelection.Select(segments, ArMethod.MaxLikelihood, OrderPolicy.Aic, 6);

        for (var order = 0; order <= 6; order++)
        {
            var fit = ArFit.Fit(segments, order, ArMethod.MaxLikelihood);
            Close.Equal(-2 * fit.LogLikelihood!.Value + 2 * (order + 2), result.Criteria[order].Aic, 1e-7, $"aic({order})");
        }
    }

    [Fact]
    public void SegmentsTooShortForTheOrderAreRefused()
    {
        double[][] segments = [[1, 2], [3, 1], [2, 5]];

        var error = Assert.Throws<Series.SeriesException>(() => ArFit.Fit(segments, 2, ArMethod.Burg));

        Assert.Equal(Series.SeriesProblem.TooShort, error.Problem);
    }

    private static double Sq(double x) => x * x;
}
