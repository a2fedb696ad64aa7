using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Tests.Support;
using Xunit.Abstractions;

namespace ForecastHub.Core.Tests.Modeling;

public sealed class SeasonalArTests(ITestOutputHelper output)
{
    /// <summary>The year settings are chosen on: Seattle 2014 (NOAA via vega-datasets 3.2.1), models fitted every day
    /// on the data before it (from 2012), one day ahead. The same fits forecast with and without their seasonal AR
    /// coefficients; with them the day-ahead MAE must not be worse on either series, and lower on the one where the
    /// AIC takes them.</summary>
    [Fact]
    public void SeasonalCoefficientsDoNoHarmOnTheChoosingYear()
    {
        var (dates, max, min) = SeattleWeather.Load();
        foreach (var (name, statistic, values) in new[] { ("max", DailyStatistic.Max, max), ("min", DailyStatistic.Min, min) })
        {
            var grid = SeattleWeather.Grid(dates, values, statistic);
            var first = Array.IndexOf(dates, new DateOnly(2014, 1, 1));
            var last = Array.IndexOf(dates, new DateOnly(2014, 12, 31));
            double seasonal = 0, constant = 0;
            var used = 0;
            for (var t = first; t <= last; t++)
            {
                var known = grid.Until(t - 1);
                var model = SiteModelFitter.Fit(known, new ModelSettings());
                used += model.SeasonalAr is { Used: true } ? 1 : 0;
                var withTerms = SiteForecaster.Forecast(model, known, 1, [0.8], [], 0, paths: 0).Steps[0].Mean;
                var without = SiteForecaster.Forecast(model with { SeasonalAr = null }, known, 1, [0.8], [], 0, paths: 0).Steps[0].Mean;
                seasonal += Math.Abs(grid.Values[t] - withTerms);
                constant += Math.Abs(grid.Values[t] - without);
            }

            var days = last - first + 1;
            output.WriteLine($"temp_{name} 2014: MAE with seasonal AR {seasonal / days:F4}, constant {constant / days:F4}; seasonal form chosen on {used} of {days} days");
            Assert.True(seasonal <= constant * 1.002, $"temp_{name}: seasonal {seasonal / days:F4} against constant {constant / days:F4}");
            if (used > days / 4)
            {
                Assert.True(seasonal < constant);
            }
        }
    }

    /// <summary>A simulated daily AR(1) whose coefficient swings with the season (0.8 in January, 0.4 in July) around
    /// an annual cycle: the fit chooses the seasonal form and recovers the swing; a constant AR(1) keeps the constant form.</summary>
    [Theory]
    [InlineData(0.2, true)]
    [InlineData(0.0, false)]
    public void SeasonalFormIsChosenWhenTheCoefficientMovesWithTheSeason(double swing, bool expected)
    {
        var random = new Random(11);
        var days = 3 * 365;
        var values = new double[days];
        var a = 0.0;
        for (var t = 0; t < days; t++)
        {
            var angle = 2 * Math.PI * (t % 365) / 365.25;
            a = ((0.6 + swing * Math.Cos(angle)) * a) + SomeAr.Gaussian(random);
            values[t] = 10 - 8 * Math.Cos(angle) + a;
        }

        var model = SiteModelFitter.Fit(SomeGrid.DailyGrid(values), new ModelSettings { IntervalMethod = IntervalMethod.Gaussian });
        var terms = model.SeasonalAr!;
        output.WriteLine($"swing {swing}: order {terms.Order}, AIC constant {terms.AicConstant:F1}, seasonal {terms.AicSeasonal:F1}, cos_1 {terms.Cos[0]:F3}; {terms.Decision}");
        Assert.Equal(expected, terms.Used);
        if (expected)
        {
            Assert.InRange(terms.Cos[0], swing - 0.1, swing + 0.1);
        }
    }
}
