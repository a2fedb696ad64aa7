using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Correlation;
using ForecastHub.Core.Forecasting;
using ForecastHub.Core.Selection;
using ForecastHub.Core.Series;
using ForecastHub.Core.Tests.Support;

namespace ForecastHub.Core.Tests;

public sealed class EdgeCaseTests
{
    [Theory]
    [MemberData(nameof(SomeAr.Methods), MemberType = typeof(SomeAr))]
    public void EmptySeriesIsRefusedAsEmpty(ArMethod method)
    {
        var error = Assert.Throws<SeriesException>(() => ArFit.Fit(new[] { Array.Empty<double>() }, 1, method));
        Assert.Equal(SeriesProblem.Empty, error.Problem);
    }

    [Theory]
    [MemberData(nameof(SomeAr.Methods), MemberType = typeof(SomeAr))]
    public void SeriesWithNaNIsRefusedAsNonFinite(ArMethod method)
    {
        var series = SomeAr.ArSeries(50, [0.5]);
        series[17] = double.NaN;
        var error = Assert.Throws<SeriesException>(() => ArFit.Fit(series, 1, method));
        Assert.Equal(SeriesProblem.NonFinite, error.Problem);
    }

    [Theory]
    [MemberData(nameof(SomeAr.Methods), MemberType = typeof(SomeAr))]
    public void ConstantSeriesIsRefusedAsConstant(ArMethod method)
    {
        var error = Assert.Throws<SeriesException>(() => ArFit.Fit(SomeAr.Constant(30), 1, method));
        Assert.Equal(SeriesProblem.Constant, error.Problem);
    }

    [Theory]
    [MemberData(nameof(SomeAr.Methods), MemberType = typeof(SomeAr))]
    public void SeriesShorterThanOrderPlusTwoIsRefusedAsTooShort(ArMethod method)
    {
        var error = Assert.Throws<SeriesException>(() => ArFit.Fit(new[] { 1.0, 2.0, 0.5, 3.0 }, 3, method));
        Assert.Equal(SeriesProblem.TooShort, error.Problem);
    }

    [Fact]
    public void OrderSelectionRefusesFewerThanThreePoints()
    {
        var error = Assert.Throws<SeriesException>(() => OrderSelection.Select(new[] { 1.0, 2.0 }, ArMethod.Burg, OrderPolicy.PacfAic, 10));
        Assert.Equal(SeriesProblem.TooShort, error.Problem);
    }

    [Fact]
    public void AcfOfConstantSeriesIsRefusedAsConstant()
    {
        var error = Assert.Throws<SeriesException>(() => Autocorrelation.Acf(SomeAr.Constant(10), 3));
        Assert.Equal(SeriesProblem.Constant, error.Problem);
    }

    [Fact]
    public void RandomWalkIsFittedAndReportedNearUnitRoot()
    {
        var model = ArFit.Fit(SomeAr.RandomWalk(3000), 1, ArMethod.Burg);
        Assert.Equal(StationarityStatus.NearUnitRoot, model.Stationarity);
        Assert.True(model.Stationary);
        var path = ArForecast.Forecast(model, SomeAr.RandomWalk(3000), 24);
        Assert.All(path.Sd, sd => Assert.True(double.IsFinite(sd) && sd > 0));
    }

    [Fact]
    public void ForecastNeedsAtLeastOrderHistoryPoints()
    {
        var model = ArFit.Fit(SomeAr.ArSeries(200, [0.5, 0.2]), 2, ArMethod.YuleWalker);
        var error = Assert.Throws<SeriesException>(() => ArForecast.Forecast(model, new[] { 1.0 }, 3));
        Assert.Equal(SeriesProblem.TooShort, error.Problem);
    }
}
