using System.Text.Json;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Tests.Support;

namespace ForecastHub.Core.Tests.Modeling;

/// <summary>A refit keeps the previous model's calibration table while the data it rests on has barely moved (Calibration.CanCarry).</summary>
public sealed class CalibrationCarryTests
{
    private static readonly TimeSpan Week = Calibration.DefaultCarryLimit;
    private static readonly ModelSettings Settings = new() { FitWindowDays = 400, MaxOrder = 24 };
    private static readonly Lazy<TimeGrid> Grid = new(() => SomeGrid.SeasonalHourlyGrid(420 * 24, seed: 5));
    private static readonly Lazy<SiteModel> Before = new(() => SiteModelFitter.Fit(Until(410), Settings));

    private static TimeGrid Until(double days) => Grid.Value.Until((int)(days * 24) - 1);

    [Fact]
    public void ABuiltTableRecordsTheWindowItWasBuiltFrom()
    {
        var table = Before.Value.Calibration;

        Assert.NotNull(table);
        Assert.Equal(Before.Value.Window, table.BuiltOn);
        Assert.DoesNotContain(Before.Value.Notes, n => n.StartsWith("Interval calibration carried", StringComparison.Ordinal));
    }

    [Fact]
    public void ARefitADayLaterKeepsTheTableAndIsOtherwiseTheFreshFit()
    {
        var carried = SiteModelFitter.Fit(Until(411), Settings, Before.Value, Week);
        var fresh = SiteModelFitter.Fit(Until(411), Settings);

        Assert.Same(Before.Value.Calibration, carried.Calibration);
        Assert.Contains(carried.Notes, n => n.StartsWith("Interval calibration carried from the fit of the window ending " + Before.Value.Window.To.ToString("O"), StringComparison.Ordinal));
        Assert.Equal(Json(fresh with { Calibration = null, Notes = [] }), Json(carried with { Calibration = null, Notes = [] }));
        Assert.NotEqual(Json(fresh.Calibration!.Quantiles), Json(carried.Calibration!.Quantiles));
    }

    [Fact]
    public void ATableReadBackFromJsonIsCarriedLikeTheOriginal()
    {
        var copy = JsonSerializer.Deserialize<SiteModel>(Json(Before.Value))!;

        Assert.Equal(Before.Value.Window, copy.Calibration!.BuiltOn);
        Assert.Equal(Json(Before.Value.Calibration), Json(SiteModelFitter.Fit(Until(411), Settings, copy, Week).Calibration));
    }

    [Theory]
    [InlineData(418, "the data end is more than a week past the table's")]
    [InlineData(409, "the data end is before the table's")]
    public void ATableIsRebuiltWhenTheDataEndHasMovedTooFar(double days, string why)
    {
        var refit = SiteModelFitter.Fit(Until(days), Settings, Before.Value, Week);

        Assert.True(refit.Calibration!.BuiltOn == refit.Window, why);
        Assert.Equal(Json(SiteModelFitter.Fit(Until(days), Settings).Calibration), Json(refit.Calibration));
    }

    [Fact]
    public void ATableIsRebuiltWhenTheSettingsDifferTheLimitIsZeroOrItsWindowIsUnknown()
    {
        var otherSettings = Settings with { MaxOrder = 23 };
        var unknownWindow = Before.Value with { Calibration = Before.Value.Calibration! with { BuiltOn = null } };

        Assert.Equal(Until(411).Times[^1], SiteModelFitter.Fit(Until(411), otherSettings, Before.Value, Week).Calibration!.BuiltOn!.To);
        Assert.Equal(Until(411).Times[^1], SiteModelFitter.Fit(Until(411), Settings, Before.Value, TimeSpan.Zero).Calibration!.BuiltOn!.To);
        Assert.Equal(Until(411).Times[^1], SiteModelFitter.Fit(Until(411), Settings, unknownWindow, Week).Calibration!.BuiltOn!.To);
    }

    [Fact]
    public void AGaussianSettingNeitherCarriesNorBuildsATable()
    {
        var refit = SiteModelFitter.Fit(Until(411), Settings with { IntervalMethod = IntervalMethod.Gaussian }, Before.Value, Week);

        Assert.Null(refit.Calibration);
    }

    [Fact]
    public void AGrowingWindowKeepsTheTableUntilItsPointsHaveGrownByMoreThanFivePercent()
    {
        // Under the 1,095-day window every new day adds points: 100 -> 104 days is 4% more, 100 -> 106 days 6% more.
        var settings = new ModelSettings { FitWindowDays = 1095, MaxOrder = 10 };
        var young = SiteModelFitter.Fit(Until(100), settings);

        var fourPercent = SiteModelFitter.Fit(Until(104), settings, young, Week);
        var sixPercent = SiteModelFitter.Fit(Until(106), settings, young, Week);

        Assert.Same(young.Calibration, fourPercent.Calibration);
        Assert.Equal(sixPercent.Window, sixPercent.Calibration!.BuiltOn);
    }

    [Fact]
    public void CanCarryNeedsAPreviousCalibratedModel()
    {
        var design = Before.Value.Climatology.Design;

        Assert.False(Calibration.CanCarry(null, Before.Value.Window.To, Before.Value.Window.Points, design, Settings, Week));
        Assert.True(Calibration.CanCarry(Before.Value, Before.Value.Window.To, Before.Value.Window.Points, design, Settings, Week));
        Assert.False(Calibration.CanCarry(Before.Value, Before.Value.Window.To, Before.Value.Window.Points, design with { DiurnalHarmonics = 2 }, Settings, Week));
    }

    private static string Json<T>(T value) => JsonSerializer.Serialize(value);
}
