using ForecastHub.Core.Health;

namespace ForecastHub.Core.Tests.Health;

public sealed class ModelHealthTests
{
    private static readonly DateTimeOffset Now = new(2026, 3, 10, 12, 0, 0, TimeSpan.Zero);
    private static readonly HealthOptions Defaults = new();

    // A fitted hourly site with fresh data, white residuals and good live scores.
    private static HealthInputs Healthy() => new()
    {
        Now = Now,
        GridPoints = 60 * 24,
        LastObservationAt = Now.AddMinutes(-30),
        ModelFittedAt = Now.AddDays(-1),
        ModelDataEnd = Now.AddDays(-1),
        ResidualPValue = 0.4,
        ScoredDays = 14,
        SkillVsPersistence = 0.3,
        Coverage80 = 0.81,
        Coverage95 = 0.94,
        LastDayReadings = 24,
        LastDayFlagged = 0,
    };

    private static string[] Codes(HealthAssessment a) => a.Reasons.Select(r => r.Code).ToArray();

    [Fact]
    public void HealthySiteIsOkWithNoReasons()
    {
        var result = ModelHealth.Evaluate(Healthy(), Defaults);

        Assert.Equal(HealthState.Ok, result.State);
        Assert.Empty(result.Reasons);
    }

    [Fact]
    public void HourlySiteWithoutModelBelowSevenDaysIsWarmingUp()
    {
        var inputs = Healthy() with { ModelFittedAt = null, ModelDataEnd = null, GridPoints = 7 * 24 - 1 };

        var result = ModelHealth.Evaluate(inputs, Defaults);

        Assert.Equal(HealthState.WarmingUp, result.State);
        Assert.Equal([HealthReasonCode.InsufficientData], Codes(result));
    }

    [Fact]
    public void HourlySiteWithSevenDaysIsNoLongerWarmingUp()
    {
        var inputs = Healthy() with { ModelFittedAt = null, ModelDataEnd = null, GridPoints = 7 * 24 };

        Assert.Equal(HealthState.Ok, ModelHealth.Evaluate(inputs, Defaults).State);
    }

    [Fact]
    public void DailySiteNeedsSixtyDaysBeforeItsFirstFit()
    {
        var inputs = Healthy() with { IsDaily = true, ModelFittedAt = null, ModelDataEnd = null, GridPoints = 59 };

        Assert.Equal(HealthState.WarmingUp, ModelHealth.Evaluate(inputs, Defaults).State);
        Assert.Equal(HealthState.Ok, ModelHealth.Evaluate(inputs with { GridPoints = 60 }, Defaults).State);
    }

    [Fact]
    public void HourlySiteWithoutReadingsForMoreThanSixHoursIsStale()
    {
        var justInside = Healthy() with { LastObservationAt = Now.AddHours(-6) };
        var outside = Healthy() with { LastObservationAt = Now.AddHours(-6).AddSeconds(-1) };

        Assert.Equal(HealthState.Ok, ModelHealth.Evaluate(justInside, Defaults).State);
        var result = ModelHealth.Evaluate(outside, Defaults);
        Assert.Equal(HealthState.Stale, result.State);
        Assert.Equal([HealthReasonCode.NoRecentData], Codes(result));
    }

    [Fact]
    public void DailySiteIsStaleOnlyAfterTwoDaysWithoutReadings()
    {
        var inputs = Healthy() with { IsDaily = true, LastObservationAt = Now.AddHours(-47) };

        Assert.Equal(HealthState.Ok, ModelHealth.Evaluate(inputs, Defaults).State);
        Assert.Equal(HealthState.Stale, ModelHealth.Evaluate(inputs with { LastObservationAt = Now.AddHours(-49) }, Defaults).State);
    }

    [Fact]
    public void ModelOlderThanSevenDaysIsStaleOnlyWhenNewerDataExists()
    {
        var oldModelNoNewData = Healthy() with
        {
            ModelFittedAt = Now.AddDays(-8),
            ModelDataEnd = Now.AddMinutes(-30),
        };
        var oldModelNewData = oldModelNoNewData with { ModelDataEnd = Now.AddDays(-8) };

        Assert.Equal(HealthState.Ok, ModelHealth.Evaluate(oldModelNoNewData, Defaults).State);
        var result = ModelHealth.Evaluate(oldModelNewData, Defaults);
        Assert.Equal(HealthState.Stale, result.State);
        Assert.Equal([HealthReasonCode.ModelOutdated], Codes(result));
    }

    [Fact]
    public void FailedFitAfterTheServingModelIsStaleAndSaysTheOldModelServes()
    {
        var inputs = Healthy() with { LastFitFailedAt = Now.AddMinutes(-5), LastFitError = "matrix is singular" };

        var result = ModelHealth.Evaluate(inputs, Defaults);

        Assert.Equal(HealthState.Stale, result.State);
        var reason = Assert.Single(result.Reasons);
        Assert.Equal(HealthReasonCode.FitFailed, reason.Code);
        Assert.Contains("matrix is singular", reason.Message, StringComparison.Ordinal);
        Assert.Contains("previous model keeps serving", reason.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void FailureOlderThanTheServingModelIsForgotten()
    {
        var inputs = Healthy() with { LastFitFailedAt = Now.AddDays(-2), LastFitError = "boom" };

        Assert.Equal(HealthState.Ok, ModelHealth.Evaluate(inputs, Defaults).State);
    }

    [Fact]
    public void NonWhiteResidualsMeanDrifting()
    {
        var result = ModelHealth.Evaluate(Healthy() with { ResidualPValue = 0.001 }, Defaults);

        Assert.Equal(HealthState.Drifting, result.State);
        Assert.Equal([HealthReasonCode.ResidualsNotWhite], Codes(result));
    }

    [Fact]
    public void NegativeLiveSkillAgainstPersistenceMeansDrifting()
    {
        var result = ModelHealth.Evaluate(Healthy() with { SkillVsPersistence = -0.01 }, Defaults);

        Assert.Equal(HealthState.Drifting, result.State);
        Assert.Equal([HealthReasonCode.SkillBelowPersistence], Codes(result));
    }

    [Theory]
    [InlineData(0.80, 0.84)]
    [InlineData(0.64, 0.95)]
    [InlineData(0.96, 0.95)]
    public void CoverageFarFromNominalMeansDrifting(double coverage80, double coverage95)
    {
        var result = ModelHealth.Evaluate(Healthy() with { Coverage80 = coverage80, Coverage95 = coverage95 }, Defaults);

        Assert.Equal(HealthState.Drifting, result.State);
        Assert.Equal([HealthReasonCode.CoverageOff], Codes(result));
    }

    [Fact]
    public void LiveScoresAreNotJudgedBeforeSevenScoredDays()
    {
        var inputs = Healthy() with { ScoredDays = 6, SkillVsPersistence = -1, Coverage95 = 0.2 };

        Assert.Equal(HealthState.Ok, ModelHealth.Evaluate(inputs, Defaults).State);
    }

    [Fact]
    public void NaNMeasuresAreNotJudged()
    {
        var inputs = Healthy() with
        {
            ResidualPValue = double.NaN,
            SkillVsPersistence = double.NaN,
            Coverage80 = double.NaN,
            Coverage95 = double.NaN,
        };

        Assert.Equal(HealthState.Ok, ModelHealth.Evaluate(inputs, Defaults).State);
    }

    [Fact]
    public void FlatLineAtTheNewestReadingsIsSensorSuspect()
    {
        var result = ModelHealth.Evaluate(Healthy() with { NewestReadingsFlatLine = true }, Defaults);

        Assert.Equal(HealthState.SensorSuspect, result.State);
        Assert.Equal([HealthReasonCode.FlatLine], Codes(result));
    }

    [Fact]
    public void MoreThanFivePercentFlaggedInTheLastDayIsSensorSuspect()
    {
        var atLimit = Healthy() with { LastDayReadings = 100, LastDayFlagged = 5 };
        var over = Healthy() with { LastDayReadings = 100, LastDayFlagged = 6 };

        Assert.Equal(HealthState.Ok, ModelHealth.Evaluate(atLimit, Defaults).State);
        Assert.Equal([HealthReasonCode.FlaggedShareHigh], Codes(ModelHealth.Evaluate(over, Defaults)));
    }

    [Fact]
    public void NoReadingsInTheLastDayMakeNoFlaggedShare()
    {
        var inputs = Healthy() with { LastDayReadings = 0, LastDayFlagged = 0 };

        Assert.DoesNotContain(HealthReasonCode.FlaggedShareHigh, Codes(ModelHealth.Evaluate(inputs, Defaults)));
    }

    [Fact]
    public void MostUrgentStateWinsAndEveryApplicableReasonIsListedMostUrgentFirst()
    {
        var inputs = Healthy() with
        {
            ResidualPValue = 0.0001,
            LastObservationAt = Now.AddHours(-7),
            NewestReadingsFlatLine = true,
        };

        var result = ModelHealth.Evaluate(inputs, Defaults);

        Assert.Equal(HealthState.SensorSuspect, result.State);
        Assert.Equal(
            [HealthReasonCode.FlatLine, HealthReasonCode.NoRecentData, HealthReasonCode.ResidualsNotWhite],
            Codes(result));
    }

    [Fact]
    public void StaleOutranksDrifting()
    {
        var inputs = Healthy() with { SkillVsPersistence = -0.5, LastObservationAt = Now.AddDays(-1) };

        var result = ModelHealth.Evaluate(inputs, Defaults);

        Assert.Equal(HealthState.Stale, result.State);
        Assert.Equal([HealthReasonCode.NoRecentData, HealthReasonCode.SkillBelowPersistence], Codes(result));
    }

    [Fact]
    public void ThresholdsAreConfigurable()
    {
        var options = Defaults with { HourlyDataMaxAge = TimeSpan.FromHours(1) };
        var inputs = Healthy() with { LastObservationAt = Now.AddHours(-2) };

        Assert.Equal(HealthState.Ok, ModelHealth.Evaluate(inputs, Defaults).State);
        Assert.Equal(HealthState.Stale, ModelHealth.Evaluate(inputs, options).State);
    }

    [Fact]
    public void InvalidOptionIsRejectedByName()
    {
        var error = Assert.Throws<ArgumentException>(() => (Defaults with { MaxFlaggedShare = 1.5 }).Validate());

        Assert.Equal(nameof(HealthOptions.MaxFlaggedShare), error.ParamName);
    }

    [Fact]
    public void DefaultsFollowTheDesign()
    {
        Assert.Equal(168, Defaults.MinHourlyPoints);
        Assert.Equal(60, Defaults.MinDailyPoints);
        Assert.Equal(TimeSpan.FromHours(6), Defaults.HourlyDataMaxAge);
        Assert.Equal(TimeSpan.FromDays(2), Defaults.DailyDataMaxAge);
        Assert.Equal(TimeSpan.FromDays(7), Defaults.ModelMaxAge);
        Assert.Equal(0.05, Defaults.MaxFlaggedShare);
        Defaults.Validate();
    }
}
