using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Climatology;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Selection;
using ForecastHub.Core.Tests.Support;

namespace ForecastHub.Core.Tests.Modeling;

/// <summary>Reference: R 4.2.2 ar() (AIC, order.max = floor(10 log10 n)) and predict.ar, fixture plain-ar-predict.json.
/// Tolerance 1e-8 (closed forms).</summary>
public sealed class PlainArTests
{
    [Theory]
    [InlineData(ArMethod.YuleWalker, "yuleWalker")]
    [InlineData(ArMethod.Burg, "burg")]
    [InlineData(ArMethod.LeastSquares, "leastSquares")]
    public void SeasonalityNoneWithGaussianIntervalsMatchesRPredict(ArMethod method, string key)
    {
        var fixture = ReferenceFixture.Load("plain-ar-predict.json");
        var grid = SomeGrid.DailyGrid(fixture.Doubles("values"));
        var settings = new ModelSettings { FitWindowDays = 1095, Seasonality = Seasonality.None, IntervalMethod = IntervalMethod.Gaussian, Method = method, OrderPolicy = OrderPolicy.Aic };

        var model = SiteModelFitter.Fit(grid, settings);
        var forecast = SiteForecaster.Forecast(model, grid, 24, [0.95], [], seed: 1);

        var reference = fixture.GetProperty(key);
        Assert.Equal(reference.GetProperty("order").GetInt32(), model.Ar.Order);
        var mean = reference.Doubles("mean");
        var se = reference.Doubles("se");
        for (var h = 0; h < 24; h++)
        {
            Assert.Equal(mean[h], forecast.Steps[h].Mean, 1e-8);
            Assert.Equal(se[h], forecast.Steps[h].Sd, 1e-8);
            var interval = Assert.Single(forecast.Steps[h].Intervals);
            Assert.Equal(mean[h] + 1.959963984540054 * se[h], interval.Upper, 1e-8);
        }

        Assert.Equal(IntervalMethod.Gaussian, forecast.IntervalMethod);
        Assert.Null(forecast.NextDay);
    }
}
