using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Tests.Support;
using ForecastHub.Core.Verification;

namespace ForecastHub.Core.Tests.Verification;

public sealed class ScoresTests
{
    /// <summary>Closed form of Gneiting and Raftery (2007) eq. 21 against R 4.2.2 integrate() of (F - 1{x &gt;= y})^2
    /// (fixture crps-gaussian.json); tolerance 1e-9 (the integral's own accuracy is about 1e-12 relative).</summary>
    [Fact]
    public void GaussianCrpsMatchesNumericalIntegrationInR()
    {
        var fixture = ReferenceFixture.Load("crps-gaussian.json");
        var (mu, sigma, y, crps) = (fixture.Doubles("mu"), fixture.Doubles("sigma"), fixture.Doubles("y"), fixture.Doubles("crps"));

        for (var i = 0; i < mu.Length; i++)
        {
            Assert.Equal(crps[i], Scores.CrpsGaussian(mu[i], sigma[i], y[i]), 1e-9);
        }
    }

    /// <summary>CRPS(N(0,1), 0) = (sqrt 2 - 1)/sqrt pi = 0.23369... (from the closed form; value from memory, as in the literature).</summary>
    [Fact]
    public void StandardNormalCrpsAtItsMeanIsTheKnownConstant()
    {
        Assert.Equal((Math.Sqrt(2) - 1) / Math.Sqrt(Math.PI), Scores.CrpsGaussian(0, 1, 0), 1e-14);
        Assert.Equal(0.2337, Scores.CrpsGaussian(0, 1, 0), 4);
    }

    [Fact]
    public void CrpsOfAPointForecastIsTheAbsoluteErrorAndNegativeSigmaIsNaN()
    {
        Assert.Equal(1.5, Scores.CrpsGaussian(2, 0, 0.5));
        Assert.True(double.IsNaN(Scores.CrpsGaussian(2, -1, 0.5)));
        Assert.True(double.IsNaN(Scores.CrpsGaussian(double.NaN, 1, 0.5)));
    }

    [Fact]
    public void WinklerScoreIsTheWidthPlusTwoOverAlphaTimesTheMiss()
    {
        Assert.Equal(4, Scores.Winkler(-2, 2, 0.8, 1));
        Assert.Equal(4 + 2 / 0.2 * 1, Scores.Winkler(-2, 2, 0.8, 3), 12);
        Assert.Equal(4 + 2 / 0.05 * 0.5, Scores.Winkler(-2, 2, 0.95, -2.5), 12);
    }

    [Fact]
    public void PinballLossWeighsMissesByTheQuantileLevel()
    {
        Assert.Equal(0.9 * 2, Scores.Pinball(1, 0.9, 3), 12);
        Assert.Equal(0.1 * 2, Scores.Pinball(3, 0.9, 1), 12);
        Assert.Equal(0, Scores.Pinball(3, 0.9, 3));
    }

    [Fact]
    public void AccumulatorSkipsMissingOutcomesAndComputesSkill()
    {
        var scores = new ScoreAccumulator(1, [0.8]);
        scores.Add(1, observed: 1, mean: 2, sd: 1, lower: [0], upper: [4], persistence: 3, climatology: 5);
        scores.Add(1, observed: 3, mean: 2, sd: 1, lower: [0], upper: [2.5], persistence: 3, climatology: 5);
        scores.Add(1, observed: double.NaN, mean: 2, sd: 1, lower: [0], upper: [4], persistence: 3, climatology: 5);

        var h = Assert.Single(scores.Result());

        Assert.Equal(2, h.Count);
        Assert.Equal(1, h.Mae);
        Assert.Equal(0, h.Bias);
        Assert.Equal(1, h.PersistenceMae);
        Assert.Equal(1 - 1.0 / 2.0, h.SkillVsPersistence, 12);
        Assert.Equal(1 - 1.0 / 10.0, h.SkillVsClimatology, 12);
        Assert.Equal(0.5, h.Intervals[0].Coverage);
        Assert.Equal(3.25, h.Intervals[0].MeanWidth);
    }
}

public sealed class BacktestEdgeTests
{
    private static readonly DateOnly Day0 = new(2012, 1, 1);

    private static GridReading[] DailyReadings(double[] values) =>
        [.. values.Select((v, i) => new GridReading(new DateTimeOffset(Day0.AddDays(i).ToDateTime(new TimeOnly(12, 0)), TimeSpan.Zero), v))];

    private static readonly GridOptions Daily = new(GridCadence.Daily, "UTC", DailyStatistic.Mean);

    [Fact]
    public void BacktestWithoutEnoughDataBeforeAnyOriginIsNull()
    {
        var readings = DailyReadings(SomeAr.ArSeries(100, [0.5], mean: 3));
        var settings = new ModelSettings { FitWindowDays = 1095 };

        // 100 observed days are fewer than the 10 x 10 a fit needs before the last origin; test days before the data have no history.
        Assert.Null(Backtest.Run(readings, Daily, settings, new BacktestOptions { DataEnd = readings[^1].Time, Days = 30 }));
        Assert.Null(Backtest.Run(readings, Daily, settings, new BacktestOptions { DataEnd = readings[0].Time.AddDays(-10), Days = 5 }));
        Assert.Null(Backtest.Run([], Daily, settings, new BacktestOptions { DataEnd = readings[0].Time, Days = 5 }));
    }

    [Fact]
    public void BacktestNeverLetsAFitOrForecastSeeDataAfterItsOrigin()
    {
        var values = SomeAr.ArSeries(200, [0.6], mean: 3);
        var readings = DailyReadings(values);
        var changedFuture = DailyReadings([.. values.Select((v, i) => i >= 180 ? v + 50 : v)]);
        var options = new BacktestOptions { DataEnd = readings[180].Time, Days = 1, RefitEveryDays = 1 };
        var settings = new ModelSettings { FitWindowDays = 1095, IntervalMethod = IntervalMethod.Gaussian };

        var a = Backtest.Run(readings, Daily, settings, options)!;
        var b = Backtest.Run(changedFuture, Daily, settings, options)!;

        Assert.Equal((1, 1), (a.Origins, a.Refits));
        Assert.Equal(1, a.Horizons[0].Count);
        Assert.Equal(Math.Abs(a.Horizons[0].Bias - 50), b.Horizons[0].Mae, 9);
        Assert.Equal(a.Horizons[0].Bias - 50, b.Horizons[0].Bias, 9);
    }

    [Fact]
    public void ReadingsOutOfTimeOrderGiveTheSameBacktest()
    {
        var readings = DailyReadings(SomeAr.ArSeries(300, [0.6], mean: 3));
        var options = new BacktestOptions { DataEnd = readings[^1].Time, Days = 40, RefitEveryDays = 10 };
        var settings = new ModelSettings { FitWindowDays = 1095, IntervalMethod = IntervalMethod.Gaussian };

        var inOrder = Backtest.Run(readings, Daily, settings, options)!;
        var shuffled = Backtest.Run([.. readings.OrderBy(r => r.ValueC)], Daily, settings, options)!;

        Assert.Equal((40, 4), (inOrder.Origins, inOrder.Refits));
        Assert.Equal((inOrder.Pooled.Count, inOrder.Pooled.Mae, inOrder.Pooled.Crps), (shuffled.Pooled.Count, shuffled.Pooled.Mae, shuffled.Pooled.Crps));
    }
}
