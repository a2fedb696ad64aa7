using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Tests.Support;
using ForecastHub.Core.Verification;
using Xunit.Abstractions;

namespace ForecastHub.Core.Tests.Verification;

/// <summary>Real data: Seattle daily max and min 2012-2015 (NOAA via vega-datasets 3.2.1). Trained on 2012-2014,
/// rolled through 2015 with a refit every day (one origin at the start of each day), default settings.</summary>
public sealed class SeattleBacktestTests(ITestOutputHelper output)
{
    [Fact]
    public void DayAheadForecastsBeatPersistenceAndClimatologyWithNominalCoverage()
    {
        var (dates, max, min) = SeattleWeather.Load();
        var options = new BacktestOptions
        {
            DataEnd = SeattleWeather.Readings(dates, max)[^1].Time,
            Days = 365,
            RefitEveryDays = 1,
        };
        var settings = new ModelSettings { FitWindowDays = 1095 };
        var results = new[] { ("max", DailyStatistic.Max, max), ("min", DailyStatistic.Min, min) }
            .Select(c => (c.Item1, Backtest.Run(SeattleWeather.Readings(dates, c.Item3), new GridOptions(GridCadence.Daily, SeattleWeather.Zone, c.Item2), settings, options)!))
            .ToArray();

        foreach (var (name, r) in results)
        {
            var h1 = r.Horizons[0];
            output.WriteLine(
                $"temp_{name}: origins {r.Origins}, refits {r.Refits}, MAE {h1.Mae:F3}, persistence {h1.PersistenceMae:F3} (ratio {h1.Mae / h1.PersistenceMae:F4}), " +
                $"climatology {h1.ClimatologyMae:F3}, RMSE {h1.Rmse:F3}, bias {h1.Bias:F3}, skill vs persistence {h1.SkillVsPersistence:F3}, vs climatology {h1.SkillVsClimatology:F3}, " +
                $"CRPS {h1.Crps:F3}, coverage 80% {h1.Intervals[0].Coverage:P1} (width {h1.Intervals[0].MeanWidth:F2}), 95% {h1.Intervals[1].Coverage:P1} (width {h1.Intervals[1].MeanWidth:F2})");
        }

        var pooled80 = results.Average(r => r.Item2.Horizons[0].Intervals[0].Coverage);
        var pooled95 = results.Average(r => r.Item2.Horizons[0].Intervals[1].Coverage);
        output.WriteLine($"pooled coverage: 80% {pooled80:P1}, 95% {pooled95:P1}");

        // The figures of docs/numerics.md (first measured with the grid-step backtest this engine replaced).
        Assert.Equal((2.098, 2.240, 2.839, 1.478), Rounded(results[0].Item2.Horizons[0]));
        Assert.Equal((1.417, 1.492, 2.017, 1.006), Rounded(results[1].Item2.Horizons[0]));
        foreach (var (_, r) in results)
        {
            Assert.Equal(365, r.Origins);
            Assert.Equal(365, r.Refits);
            Assert.True(r.Horizons[0].Mae <= 0.95 * r.Horizons[0].PersistenceMae);
            Assert.True(r.Horizons[0].Mae < r.Horizons[0].ClimatologyMae);
        }

        Assert.InRange(pooled80, 0.77, 0.83);
        Assert.InRange(pooled95, 0.92, 0.98);
    }

    private static (double Mae, double PersistenceMae, double ClimatologyMae, double Crps) Rounded(HorizonScores h) =>
        (Math.Round(h.Mae, 3), Math.Round(h.PersistenceMae, 3), Math.Round(h.ClimatologyMae, 3), Math.Round(h.Crps, 3));
}
