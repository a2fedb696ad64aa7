using ForecastHub.Core.Modeling;
using ForecastHub.Core.Tests.Support;
using Xunit.Abstractions;

namespace ForecastHub.Core.Tests.Modeling;

public sealed class CalibrationCoverageTests(ITestOutputHelper output)
{
    /// <summary>Property: a model fitted on 3 simulated years (seed 42) and applied to the following year
    /// from 1,250 origins (every 7 hours) covers the held-out outcomes at horizons 1..24 at the nominal rate
    /// (30,000 outcomes; tolerance of the issue: 94-96% and 78-82%).</summary>
    [Fact]
    public void CalibratedIntervalsCoverHeldOutOutcomesAtTheNominalRate()
    {
        const int trainHours = 3 * 8760;
        var grid = SomeGrid.SeasonalHourlyGrid(trainHours + 8760 + 24, seed: 42);
        var model = SiteModelFitter.Fit(grid.Until(trainHours - 1), new ModelSettings { FitWindowDays = 1095 });
        var gaussianModel = model with { Settings = model.Settings with { IntervalMethod = IntervalMethod.Gaussian } };

        var (calibrated, gaussian, outcomes) = (new double[2], new double[2], 0);
        for (var o = trainHours - 1; o < trainHours - 1 + 8750; o += 7)
        {
            var known = grid.Until(o);
            var c = SiteForecaster.Forecast(model, known, 24, [0.8, 0.95], [], seed: 0, paths: 0);
            var g = SiteForecaster.Forecast(gaussianModel, known, 24, [0.8, 0.95], [], seed: 0, paths: 0);
            for (var h = 1; h <= 24; h++)
            {
                var y = grid.Values[o + h];
                outcomes++;
                for (var l = 0; l < 2; l++)
                {
                    calibrated[l] += Covers(c.Steps[h - 1].Intervals[l], y);
                    gaussian[l] += Covers(g.Steps[h - 1].Intervals[l], y);
                }
            }
        }

        output.WriteLine($"AR order {model.Ar.Order}, calibration from {model.Calibration!.Errors} errors at {model.Calibration.Origins} origins; {outcomes} held-out outcomes");
        output.WriteLine($"calibrated coverage: 80% {calibrated[0] / outcomes:P2}, 95% {calibrated[1] / outcomes:P2}; gaussian: 80% {gaussian[0] / outcomes:P2}, 95% {gaussian[1] / outcomes:P2}");
        Assert.InRange(calibrated[0] / outcomes, 0.78, 0.82);
        Assert.InRange(calibrated[1] / outcomes, 0.94, 0.96);
    }

    private static int Covers(ForecastHub.Core.Forecasting.PredictionInterval interval, double y) => y >= interval.Lower && y <= interval.Upper ? 1 : 0;
}
