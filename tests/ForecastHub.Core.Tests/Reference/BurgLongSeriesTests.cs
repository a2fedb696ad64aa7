using System.Text.Json;
using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Selection;
using ForecastHub.Core.Series;
using ForecastHub.Core.Tests.Support;

namespace ForecastHub.Core.Tests.Reference;

/// <summary>
/// Burg on a series long enough to be swept as two halves side by side (BurgEstimator.SweepInTwo), against R 4.2.2
/// Patched (2022-11-10 r83330) stats::ar.burg, via the fixture written by tests/reference/burg-long-fixtures.R.
/// The 40,000-point series is rebuilt here from the script's recurrence; its first and last values are checked
/// bit for bit first. Tolerances are relative to max(1, |value|): 1e-8, as for the other recursions.
/// </summary>
public sealed class BurgLongSeriesTests
{
    private const double ClosedForm = 1e-8;

    private static readonly JsonElement Fixture = ReferenceFixture.Load("burg-long.json");

    /// <summary>x[t] = 0.6 x[t-1] - 0.2 x[t-2] + ((7919 t) mod 10007) / 10007 - 0.5, t = 1..n (R's indices).</summary>
    private static double[] Series(int n)
    {
        var x = new double[n];
        for (var t = 1; t <= n; t++)
        {
            var e = (7919L * t % 10007 / 10007.0) - 0.5;
            var x1 = t > 1 ? x[t - 2] : 0;
            var x2 = t > 2 ? x[t - 3] : 0;
            x[t - 1] = (0.6 * x1) - (0.2 * x2) + e;
        }

        return x;
    }

    private static readonly double[] X = Series(Fixture.Whole("n"));

    [Fact]
    public void TheSeriesIsRsBitForBitAndLongEnoughToBeSweptInTwoHalves()
    {
        Assert.StartsWith("R version 4.2.2", Fixture.GetProperty("rVersion").GetString(), StringComparison.Ordinal);
        Assert.Equal(Fixture.Doubles("first"), X[..5]);
        Assert.Equal(Fixture.Doubles("last"), X[^5..]);
        Assert.True(X.Length >= 2 * BurgEstimator.MinRowsPerHalf);
    }

    [Theory]
    [InlineData("burg1Order12", BurgVariance.Recursion)]
    [InlineData("burg2Order12", BurgVariance.ErrorEnergy)]
    public void OrderTwelveCoefficientsVarianceAndPartialsMatchR(string fit, BurgVariance variance)
    {
        var r = Fixture.GetProperty(fit);

        // R ar.burg(aic = FALSE, order.max = 12, var.method = 1 or 2).
        var model = ArFit.Fit(X, 12, ArMethod.Burg, variance);
        var path = BurgEstimator.Path(SegmentSummary.Of([X]), 12, variance);

        Close.All(r.Doubles("coef"), model.Coefficients, ClosedForm, $"{fit} coef");
        Close.Equal(r.Number("varPred"), model.InnovationVariance, ClosedForm, $"{fit} var.pred");
        Close.Equal(r.Number("xMean"), model.Mean, ClosedForm, $"{fit} x.mean");
        Close.All(r.Doubles("partialacf"), path.Partials, ClosedForm, $"{fit} partialacf");
    }

    [Fact]
    public void TheAicChoiceAmongOrdersUpToTheCapMatchesR()
    {
        var r = Fixture.GetProperty("burg1Aic46");

        // R ar.burg(order.max = 46, var.method = 1): asked for 48, as a refit is, the order is capped at floor(10 log10 n) = 46.
        var result = OrderSelection.Select(X, ArMethod.Burg, OrderPolicy.Aic, 48);

        Assert.Equal(46, result.MaxOrder);
        Assert.Equal(r.Whole("order"), result.ChosenOrder);
        Close.All(r.Doubles("coef"), result.Model.Coefficients, ClosedForm, "coef");
        Close.Equal(r.Number("varPred"), result.Model.InnovationVariance, ClosedForm, "var.pred");
        Close.All(r.Doubles("partialacf"), BurgEstimator.Path(SegmentSummary.Of([X]), 46, BurgVariance.Recursion).Partials, ClosedForm, "partialacf");
    }
}
