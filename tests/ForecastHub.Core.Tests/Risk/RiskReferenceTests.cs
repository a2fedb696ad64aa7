using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Climatology;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Risk;
using ForecastHub.Core.Selection;
using ForecastHub.Core.Tests.Support;

namespace ForecastHub.Core.Tests.Risk;

/// <summary>Reference: R 4.2.2 stats ar (Yule-Walker, AIC), predict.ar and pnorm, fixture pnorm-step-probabilities.json
/// (tests/reference/risk-fixtures.R). Tolerance 1e-8 (the forecast mean and sd match R to 1e-8; pnorm is then exact).</summary>
public sealed class RiskReferenceTests
{
    [Fact]
    public void GaussianStepProbabilitiesEqualRPnorm()
    {
        var fixture = ReferenceFixture.Load("pnorm-step-probabilities.json");
        var grid = SomeGrid.DailyGrid(fixture.Doubles("values"));
        var settings = new ModelSettings { Seasonality = Seasonality.None, IntervalMethod = IntervalMethod.Gaussian, Method = ArMethod.YuleWalker, OrderPolicy = OrderPolicy.Aic };
        var model = SiteModelFitter.Fit(grid, settings);
        var thresholds = fixture.Doubles("thresholds");
        var request = new RiskRequest(
            [.. thresholds.Select(c => new RiskThreshold(null, ThresholdDirection.Below, c)), .. thresholds.Select(c => new RiskThreshold(null, ThresholdDirection.Above, c))],
            NightHours.Default,
            grid.Times[^1]);

        var forecast = SiteForecaster.Forecast(model, grid, 24, [0.95], [], seed: 1, risk: request);

        Assert.Equal(fixture.Whole("order"), model.Ar.Order);
        var below = fixture.GetProperty("below").EnumerateArray().Select(r => r.EnumerateArray().Select(v => v.GetDouble()).ToArray()).ToArray();
        var above = fixture.GetProperty("above").EnumerateArray().Select(r => r.EnumerateArray().Select(v => v.GetDouble()).ToArray()).ToArray();
        for (var h = 0; h < 24; h++)
        {
            for (var i = 0; i < thresholds.Length; i++)
            {
                Assert.Equal(below[h][i], forecast.Steps[h].Probabilities[i].Probability, 1e-8);
                Assert.Equal(above[h][i], forecast.Steps[h].Probabilities[thresholds.Length + i].Probability, 1e-8);
            }
        }
    }
}
