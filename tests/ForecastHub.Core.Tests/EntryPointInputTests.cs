using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Correlation;
using ForecastHub.Core.Diagnostics;
using ForecastHub.Core.Forecasting;
using ForecastHub.Core.Selection;
using ForecastHub.Core.Series;
using ForecastHub.Core.Tests.Support;

namespace ForecastHub.Core.Tests;

/// <summary>The documented NaN / empty / too-short / constant outcome of each AR-side entry point.</summary>
public sealed class EntryPointInputTests
{
    [Fact]
    public void PacfOfSeriesWithNaNIsRefusedAsNonFinite()
    {
        var series = SomeAr.ArSeries(40, [0.3]);
        series[5] = double.NaN;
        Assert.Equal(SeriesProblem.NonFinite, Assert.Throws<SeriesException>(() => Autocorrelation.Pacf(series, 5)).Problem);
    }

    [Fact]
    public void AcfOfNoSegmentsIsRefusedAsEmpty()
    {
        Assert.Equal(SeriesProblem.Empty, Assert.Throws<SeriesException>(() => Autocorrelation.Acf(Array.Empty<double[]>(), 3)).Problem);
    }

    [Fact]
    public void AcfClampsMaxLagToOneBelowTheLengthAsR()
    {
        Assert.Equal(4, Autocorrelation.Acf([1.0, 3, 2, 5], 10).Length);
    }

    [Fact]
    public void BandRefusesAlphaOutsideTheOpenUnitInterval()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => Autocorrelation.Band(100, 1.0));
        Assert.Throws<ArgumentOutOfRangeException>(() => Autocorrelation.Band(0));
    }

    [Fact]
    public void OrderSelectionOfSeriesWithNaNIsRefusedAsNonFinite()
    {
        var series = SomeAr.ArSeries(100, [0.3]);
        series[^1] = double.PositiveInfinity;
        var error = Assert.Throws<SeriesException>(() => OrderSelection.Select(series, ArMethod.Burg, OrderPolicy.PacfAic, 10));
        Assert.Equal(SeriesProblem.NonFinite, error.Problem);
    }

    [Fact]
    public void OrderSelectionOfConstantSeriesIsRefusedAsConstant()
    {
        var error = Assert.Throws<SeriesException>(() => OrderSelection.Select(SomeAr.Constant(50), ArMethod.YuleWalker, OrderPolicy.Aic, 10));
        Assert.Equal(SeriesProblem.Constant, error.Problem);
    }

    [Fact]
    public void ShortSeriesLowersMaxOrderToWhatTheDataSupports()
    {
        var result = OrderSelection.Select(new[] { 1.0, 3, 2, 5 }, ArMethod.YuleWalker, OrderPolicy.Aic, 10);

        // floor(10 log10 4) = 6, but an AR(p) fit needs p + 2 points.
        Assert.Equal(2, result.MaxOrder);
        Assert.Equal(3, result.Criteria.Count);
    }

    [Fact]
    public void MaxOrderSettingOfZeroChoosesTheMeanOnlyModel()
    {
        var result = OrderSelection.Select(SomeAr.ArSeries(100, [0.6]), ArMethod.Burg, OrderPolicy.PacfAic, 0);

        Assert.Equal(0, result.MaxOrder);
        Assert.Empty(result.Pacf);
        Assert.Equal(0, result.ChosenOrder);
        Assert.Equal(0, result.Model.Order);
    }

    [Fact]
    public void ForecastWithNaNInTheLastOrderPointsIsRefusedAsNonFinite()
    {
        var series = SomeAr.ArSeries(200, [0.5, 0.2]);
        var model = ArFit.Fit(series, 2, ArMethod.Burg);
        series[^1] = double.NaN;
        Assert.Equal(SeriesProblem.NonFinite, Assert.Throws<SeriesException>(() => ArForecast.Forecast(model, series, 5)).Problem);
    }

    [Fact]
    public void ForecastOfAnOrderZeroModelIsTheMeanWithConstantSd()
    {
        var model = ArFit.Fit(SomeAr.ArSeries(200, [], mean: 3), 0, ArMethod.YuleWalker);
        var path = ArForecast.Forecast(model, Array.Empty<double>(), 3);
        Assert.All(path.Mean, m => Assert.Equal(model.Mean, m));
        Assert.All(path.Sd, s => Assert.Equal(Math.Sqrt(model.InnovationVariance), s, 1e-12));
    }

    [Fact]
    public void IntervalLevelMustLieStrictlyBetweenZeroAndOne()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => GaussianInterval.Of(0, 1, 1));
        Assert.Throws<ArgumentOutOfRangeException>(() => GaussianInterval.Of(0, 1, double.NaN));
        Assert.Equal(1.959963984540054, GaussianInterval.Of(0, 1, 0.95).Upper, 1e-12);
    }

    [Fact]
    public void PsiWeightsOfAnArOneArePowersOfPhi()
    {
        Assert.Equal(new[] { 1, 0.5, 0.25, 0.125 }, ArForecast.PsiWeights([0.5], 4));
    }

    [Fact]
    public void ResidualsOfASegmentNoLongerThanTheOrderAreEmpty()
    {
        var model = ArFit.Fit(SomeAr.ArSeries(200, [0.5, 0.2]), 2, ArMethod.YuleWalker);
        var residuals = ArFit.Residuals(model, [[1.0, 2.0], SomeAr.ArSeries(10, [0.5])]);
        Assert.Empty(residuals[0]);
        Assert.Equal(8, residuals[1].Length);
    }

    [Fact]
    public void LjungBoxRefusesConstantResidualsAndLagsNotAboveFitdf()
    {
        Assert.Equal(SeriesProblem.Constant, Assert.Throws<SeriesException>(() => LjungBox.Test(SomeAr.Constant(30), 5, 1)).Problem);
        Assert.Throws<ArgumentOutOfRangeException>(() => LjungBox.Test(SomeAr.ArSeries(30, [0.1]), 2, 2));
        Assert.Throws<ArgumentOutOfRangeException>(() => LjungBox.Test(SomeAr.ArSeries(30, [0.1]), 30, 1));
    }

    [Fact]
    public void JarqueBeraRefusesConstantResidualsWhileTheSummaryReportsZeroSd()
    {
        Assert.Equal(SeriesProblem.Constant, Assert.Throws<SeriesException>(() => JarqueBera.Test(SomeAr.Constant(30))).Problem);
        var summary = ResidualSummary.Of(SomeAr.Constant(30));
        Assert.Equal(0, summary.Sd);
        Assert.Equal(4.2, summary.Mean, 1e-12);
    }

    [Fact]
    public void LeastSquaresOnAnExplosiveSeriesIsReportedNonStationary()
    {
        var random = new Random(7);
        var x = new double[300];
        for (var t = 1; t < x.Length; t++)
        {
            x[t] = 1.02 * x[t - 1] + SomeAr.Gaussian(random);
        }

        var model = ArFit.Fit(x, 1, ArMethod.LeastSquares);

        Assert.Equal(StationarityStatus.NonStationary, model.Stationarity);
        Assert.False(model.Stationary);
    }

    [Fact]
    public void TrailingZeroCoefficientsLowerTheDegreeOfTheCharacteristicPolynomial()
    {
        var roots = CharacteristicRoots.Of([0.5, 0, 0]);
        var root = Assert.Single(roots);
        Assert.Equal(2, root.Re, 1e-12);
        Assert.Equal(StationarityStatus.Stationary, CharacteristicRoots.Classify(roots));
    }
}
