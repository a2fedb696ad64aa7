using System.Text.Json;
using ForecastHub.Core.Climatology;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Series;
using ForecastHub.Core.Tests.Support;

namespace ForecastHub.Core.Tests.Modeling;

public sealed class SiteModelTests
{
    private static readonly Lazy<TimeGrid> Hourly = new(() => SomeGrid.SeasonalHourlyGrid(400 * 24, seed: 3));
    private static readonly Lazy<SiteModel> HourlyModel = new(() => SiteModelFitter.Fit(Hourly.Value, new ModelSettings { FitWindowDays = 1095, MaxOrder = 24 }));

    [Fact]
    public void AutoSeasonalityUsesAnnualAndDiurnalTermsForAYearOfHourlyData()
    {
        var model = HourlyModel.Value;

        Assert.Equal(2, model.Climatology.Design.AnnualHarmonics);
        Assert.Equal(3, model.Climatology.Design.DiurnalHarmonics);
        Assert.Equal("gls", model.Climatology.Estimation);
        Assert.Equal(400 * 24 - 1, (model.Window.To - model.Window.From).TotalHours);
        Assert.NotNull(model.Calibration);
        Assert.NotNull(model.Diagnostics.LjungBox);
        Assert.Equal(model.Ar.Order, model.OrderSelection.ChosenOrder);
    }

    [Fact]
    public void AFitOnPooledDesignColumnsEqualsOneOnColumnsOfExactlyTheWindowsLength()
    {
        // Pooled columns run longer than the window and hold an earlier, longer fit's rows beyond it: no reader may look there.
        var settings = new ModelSettings { FitWindowDays = 1095, MaxOrder = 24 };
        SiteModelFitter.Fit(SomeGrid.SeasonalHourlyGrid(500 * 24, seed: 8), settings);
        var pooled = SiteModelFitter.Fit(Hourly.Value, settings);

        var window = SeriesWindow.FromGrid(Hourly.Value, settings.FitWindowDays);
        var design = SiteModelFitter.ResolveDesign(window, GridCadence.Hourly, Hourly.Value.TimeZone, settings.Seasonality, []);
        var exact = SiteModelFitter.FitWithDesign(window, settings, design, design.ColumnMajor(window.Times), []);

        Assert.NotNull(exact.Calibration);
        Assert.Equal(JsonSerializer.Serialize(exact), JsonSerializer.Serialize(pooled));
    }

    [Fact]
    public void AutoSeasonalityUsesOnlyDiurnalTermsBeforeAYearOfData()
    {
        var grid = SomeGrid.SeasonalHourlyGrid(60 * 24, seed: 4);

        var model = SiteModelFitter.Fit(grid, new ModelSettings { FitWindowDays = 1095, MaxOrder = 10, IntervalMethod = IntervalMethod.Gaussian });

        Assert.Equal(0, model.Climatology.Design.AnnualHarmonics);
        Assert.Equal(3, model.Climatology.Design.DiurnalHarmonics);
    }

    [Fact]
    public void ExplicitAnnualSeasonalityWithoutAYearOfDataIsFittedWithoutItAndSaysSo()
    {
        var grid = SomeGrid.DailyGrid(SomeAr.ArSeries(200, [0.6], mean: 10));

        var model = SiteModelFitter.Fit(grid, new ModelSettings { FitWindowDays = 1095, Seasonality = Seasonality.Annual });

        Assert.Equal(1, model.Climatology.Design.Columns);
        Assert.Contains(model.Notes, n => n.Contains("year of data", StringComparison.Ordinal));
    }

    [Fact]
    public void ACalibratedFitWithTooFewOutOfSampleErrorsSaysSoAndHasNoTable()
    {
        // 40 days: each fold forecasts from 6 origins at most 7 days ahead, fewer than Calibration.MinErrors errors.
        var grid = SomeGrid.DailyGrid(SomeAr.ArSeries(40, [0.5], mean: 3));

        var model = SiteModelFitter.Fit(grid, new ModelSettings { FitWindowDays = 1095, IntervalMethod = IntervalMethod.Calibrated });

        Assert.Null(model.Calibration);
        Assert.Contains(model.Notes, n => n.StartsWith("Too little data to calibrate intervals", StringComparison.Ordinal));
    }

    [Fact]
    public void FitWindowKeepsOnlyTheNewestDays()
    {
        var grid = SomeGrid.DailyGrid(SomeAr.ArSeries(500, [0.5], mean: 3));

        var model = SiteModelFitter.Fit(grid, new ModelSettings { FitWindowDays = 100, IntervalMethod = IntervalMethod.Gaussian });

        Assert.Equal(100, model.Window.Points);
        Assert.Equal(grid.Times[^1], model.Window.To);
    }

    [Fact]
    public void SiteModelRoundTripsThroughJsonAndForecastsTheSame()
    {
        var model = HourlyModel.Value;

        var json = JsonSerializer.Serialize(model);
        var copy = JsonSerializer.Deserialize<SiteModel>(json)!;

        var a = SiteForecaster.Forecast(model, Hourly.Value, 48, [0.8, 0.95], [new Threshold(0, ThresholdDirection.Below)], seed: 9);
        var b = SiteForecaster.Forecast(copy, Hourly.Value, 48, [0.8, 0.95], [new Threshold(0, ThresholdDirection.Below)], seed: 9);
        Assert.Equal(JsonSerializer.Serialize(a), JsonSerializer.Serialize(b));
        Assert.Equal(json, JsonSerializer.Serialize(copy));
    }

    [Fact]
    public void ForecastFromOlderDataCountsHorizonsFromTheLastValueAndWidens()
    {
        var grid = Hourly.Value;
        var last = grid.Count - 1;
        var stale = GridBuilder.Build(
            grid.Times.Take(last - 5).Select((t, i) => new GridReading(t, grid.Values[i])),
            SomeGrid.Hourly("Europe/Berlin"),
            grid.Times[0],
            grid.Times[last].AddHours(1));

        var fresh = SiteForecaster.Forecast(HourlyModel.Value, grid.Until(last - 6), 6, [0.95], [], seed: 1, paths: 0);
        var late = SiteForecaster.Forecast(HourlyModel.Value, stale, 6, [0.95], [], seed: 1, paths: 0);

        Assert.Equal(6, late.MissingSteps);
        Assert.Equal(grid.Times[last - 6], late.LastData);
        Assert.Equal(grid.Times[last].AddHours(1), late.Steps[0].Time);
        Assert.Equal(7, late.Steps[0].Horizon);
        Assert.True(late.Steps[0].Sd > fresh.Steps[0].Sd);
        Assert.Contains(late.Notes, n => n.Contains("missing", StringComparison.Ordinal));
    }

    [Fact]
    public void NextDaySummaryIsReproducibleForASeedAndConsistent()
    {
        var grid = Hourly.Value;
        Threshold[] thresholds = [new(-50, ThresholdDirection.Below), new(5, ThresholdDirection.Below), new(50, ThresholdDirection.Above)];

        var a = SiteForecaster.Forecast(HourlyModel.Value, grid, 48, [0.8], thresholds, seed: 5).NextDay!;
        var b = SiteForecaster.Forecast(HourlyModel.Value, grid, 48, [0.8], thresholds, seed: 5).NextDay!;
        var c = SiteForecaster.Forecast(HourlyModel.Value, grid, 48, [0.8], thresholds, seed: 6).NextDay!;

        Assert.Equal(JsonSerializer.Serialize(a), JsonSerializer.Serialize(b));
        Assert.NotEqual(a.Min.Mean, c.Min.Mean);
        Assert.Equal(TimeSpan.FromHours(24), a.To - a.From);
        Assert.True(a.Min.Mean < a.Mean.Mean && a.Mean.Mean < a.Max.Mean);
        Assert.Equal(0, a.Probabilities[0].Probability);
        Assert.Equal(0, a.Probabilities[2].Probability);
        Assert.Equal(2000, a.Paths);
    }

    [Fact]
    public void NextDayMeanMatchesTheAverageOfTheForecastPathOverThatDay()
    {
        var grid = Hourly.Value;

        var forecast = SiteForecaster.Forecast(HourlyModel.Value, grid, 48, [0.8], [], seed: 11, paths: 20000);

        var day = forecast.Steps.Where(s => s.Time >= forecast.NextDay!.From && s.Time < forecast.NextDay.To).ToArray();
        Assert.Equal(24, day.Length);
        var sdOfMean = day.Max(s => s.Sd) / Math.Sqrt(20000);
        Assert.Equal(day.Average(s => s.Mean), forecast.NextDay!.Mean.Mean, 6 * sdOfMean);
    }

    [Fact]
    public void DailySitesHaveNoNextDaySummary()
    {
        var grid = SomeGrid.DailyGrid(SomeAr.ArSeries(300, [0.5], mean: 3));
        var model = SiteModelFitter.Fit(grid, new ModelSettings { FitWindowDays = 1095 });

        var forecast = SiteForecaster.Forecast(model, grid, 3, [0.8], [], seed: 1);

        Assert.Null(forecast.NextDay);
        Assert.Equal(grid.Times[^1].AddDays(1), forecast.Steps[0].Time);
    }

    [Fact]
    public void EmptyGridIsRefusedAsEmpty()
    {
        var empty = GridBuilder.Build([], SomeGrid.Hourly());

        var e = Assert.Throws<SeriesException>(() => SiteModelFitter.Fit(empty, new ModelSettings { FitWindowDays = 1095 }));

        Assert.Equal(SeriesProblem.Empty, e.Problem);
    }

    [Fact]
    public void AllGapsGridIsRefusedAsEmptyByFitAndForecast()
    {
        var gaps = SomeGrid.HourlyGrid(Enumerable.Repeat(double.NaN, 48).ToArray());

        Assert.Equal(SeriesProblem.Empty, Assert.Throws<SeriesException>(() => SiteModelFitter.Fit(gaps, new ModelSettings { FitWindowDays = 1095 })).Problem);
        Assert.Equal(SeriesProblem.Empty, Assert.Throws<SeriesException>(() => SiteForecaster.Forecast(HourlyModel.Value, gaps with { TimeZone = "Europe/Berlin" }, 3, [0.8], [], 1)).Problem);
    }

    [Fact]
    public void TooShortGridIsRefusedAsTooShort()
    {
        var grid = SomeGrid.HourlyGrid([1, 2, 3, 2, 1, 2]);

        var e = Assert.Throws<SeriesException>(() => SiteModelFitter.Fit(grid, new ModelSettings { FitWindowDays = 1095 }));

        Assert.Equal(SeriesProblem.TooShort, e.Problem);
    }

    [Fact]
    public void ConstantGridIsRefusedAsConstant()
    {
        var grid = SomeGrid.DailyGrid(Enumerable.Repeat(4.5, 100).ToArray());

        var e = Assert.Throws<SeriesException>(() => SiteModelFitter.Fit(grid, new ModelSettings { FitWindowDays = 1095 }));

        Assert.Equal(SeriesProblem.Constant, e.Problem);
    }

    [Fact]
    public void NaNStepsAreGapsButAnInfiniteValueIsRefusedAsNonFinite()
    {
        var values = SomeAr.ArSeries(200, [0.5], mean: 3);
        values[50] = double.NaN;
        var grid = SomeGrid.DailyGrid(values);
        var infinite = grid with { Values = grid.Values.Select((v, i) => i == 120 ? double.PositiveInfinity : v).ToArray() };

        var model = SiteModelFitter.Fit(grid, new ModelSettings { FitWindowDays = 1095, IntervalMethod = IntervalMethod.Gaussian });
        var e = Assert.Throws<SeriesException>(() => SiteModelFitter.Fit(infinite, new ModelSettings { FitWindowDays = 1095 }));

        Assert.Equal(200, model.Window.Points);
        Assert.Equal(1, model.Window.Interpolated);
        Assert.Equal(SeriesProblem.NonFinite, e.Problem);
    }

    [Fact]
    public void BadForecastArgumentsAreArgumentErrors()
    {
        var model = HourlyModel.Value;
        var grid = Hourly.Value;

        Assert.Throws<ArgumentOutOfRangeException>(() => SiteForecaster.Forecast(model, grid, 0, [0.8], [], 1));
        Assert.Throws<ArgumentOutOfRangeException>(() => SiteForecaster.Forecast(model, grid, 3, [1.0], [], 1));
        Assert.Throws<ArgumentOutOfRangeException>(() => SiteForecaster.Forecast(model, grid, 3, [double.NaN], [], 1));
        Assert.Throws<ArgumentException>(() => SiteForecaster.Forecast(model, grid with { TimeZone = "UTC" }, 3, [0.8], [], 1));
        Assert.Throws<ArgumentOutOfRangeException>(() => SiteModelFitter.Fit(grid, new ModelSettings { FitWindowDays = 0 }));
    }
}
