using ForecastHub.Core.Alerts;

namespace ForecastHub.Core.Tests.Alerts;

public sealed class AlertRulesTests
{
    private static readonly DateTimeOffset Now = new(2026, 10, 20, 16, 0, 0, TimeSpan.Zero);
    private static readonly DateTimeOffset NightFrom = Now.AddHours(2);
    private static readonly DateTimeOffset NightTo = Now.AddHours(17);

    private static WindowRiskLevel Night(double probability, DateTimeOffset? from = null, DateTimeOffset? to = null) =>
        new("frost", "night", from ?? NightFrom, to ?? NightTo, probability, 0.3);

    private static RaisedWindow RaisedNight(DateTimeOffset? from = null, DateTimeOffset? to = null) =>
        new("frost", "night", from ?? NightFrom, to ?? NightTo);

    [Fact]
    public void ProbabilityReachingTheAlertLevelRaises()
    {
        var decisions = AlertRules.Decide([], [Night(0.3)], Now);

        Assert.Equal("frost", Assert.Single(decisions.Raises).ThresholdId);
        Assert.Empty(decisions.Clears);
    }

    [Fact]
    public void ProbabilityBelowTheAlertLevelDoesNotRaise() =>
        Assert.Empty(AlertRules.Decide([], [Night(0.2999)], Now).Raises);

    [Fact]
    public void ARaisedRiskIsNotRaisedAgainOnTheNextEvaluation()
    {
        var decisions = AlertRules.Decide([RaisedNight()], [Night(0.9)], Now.AddMinutes(15));

        Assert.Empty(decisions.Raises);
        Assert.Empty(decisions.Clears);
        Assert.Single(decisions.Refreshes);
    }

    [Theory]
    [InlineData(0.24, false)] // exactly 0.8 x 0.3 stays raised: clearing needs "below"
    [InlineData(0.2399, true)]
    [InlineData(0.27, false)] // between the clear level and the alert level: hysteresis keeps it raised
    public void ARaisedRiskClearsOnlyBelowEightTenthsOfTheAlertLevel(double probability, bool clears)
    {
        var decisions = AlertRules.Decide([RaisedNight()], [Night(probability)], Now);

        Assert.Equal(clears, decisions.Clears.Count == 1);
        if (clears)
        {
            Assert.Equal(ClearReason.BelowClearLevel, decisions.Clears[0].Reason);
        }
        Assert.Empty(decisions.Raises);
    }

    [Fact]
    public void APassedWindowClearsEvenWithoutANewEvaluation()
    {
        var decisions = AlertRules.Decide([RaisedNight()], null, NightTo);

        Assert.Equal(ClearReason.WindowPassed, Assert.Single(decisions.Clears).Reason);
    }

    [Fact]
    public void WithoutARiskEvaluationARaisedWindowThatHasNotPassedStaysRaised() =>
        Assert.Empty(AlertRules.Decide([RaisedNight()], null, Now).Clears);

    [Fact]
    public void TheNextNightClearsThePassedOneAndMayRaiseAgain()
    {
        var nextFrom = NightFrom.AddDays(1);
        var decisions = AlertRules.Decide([RaisedNight()], [Night(0.5, nextFrom, NightTo.AddDays(1))], NightTo.AddHours(1));

        Assert.Equal(ClearReason.WindowPassed, Assert.Single(decisions.Clears).Reason);
        Assert.Equal(nextFrom, Assert.Single(decisions.Raises).From);
    }

    [Fact]
    public void AThresholdThatNoLongerAlertsClears()
    {
        var decisions = AlertRules.Decide([RaisedNight()], [], Now);

        Assert.Equal(ClearReason.ThresholdRemoved, Assert.Single(decisions.Clears).Reason);
    }

    [Fact]
    public void AfterAClearTheSameWindowCanRaiseAgainWhenTheLevelIsReachedAgain()
    {
        var cleared = AlertRules.Decide([RaisedNight()], [Night(0.1)], Now);
        Assert.Single(cleared.Clears);

        Assert.Single(AlertRules.Decide([], [Night(0.35)], Now.AddMinutes(15)).Raises);
    }
}
