using ForecastHub.Core.Verification;

namespace ForecastHub.Core.Tests.Verification;

/// <summary>
/// Brier score, its skill against the same-month base rate and the reliability table, against values
/// computed by hand from the definitions: BS = (1/N) sum (p - o)^2 (Brier 1950, Monthly Weather
/// Review 78, 1-3), BSS = 1 - BS / BS_ref and 10 equal bins (Wilks, Statistical Methods in the
/// Atmospheric Sciences, ch. 8; from memory). Tolerance 1e-12.
/// </summary>
public sealed class ThresholdScoresTests
{
    [Fact]
    public void BrierSkillAndReliabilityEqualTheHandComputedValues()
    {
        var scores = new ThresholdScoreAccumulator();
        scores.Add(0.05, false, 1);
        scores.Add(0.15, true, 1);
        scores.Add(0.15, false, 1);
        scores.Add(0.95, true, 2);
        scores.Add(1.00, true, 2);
        scores.Add(0.55, false, 2);

        var result = scores.Result();

        // (0.05^2 + 0.85^2 + 0.15^2 + 0.05^2 + 0 + 0.55^2) / 6 = 1.0525 / 6
        Assert.Equal(1.0525 / 6, result.Brier, 1e-12);
        // base rates: January 1/3, February 2/3; each month contributes 1/9 + 4/9 + 1/9, so BS_ref = (12/9) / 6 = 2/9
        Assert.Equal(2.0 / 9, result.ClimatologyBrier, 1e-12);
        Assert.Equal(1 - (1.0525 / 6) / (2.0 / 9), result.BrierSkill, 1e-12);
        Assert.Equal(0.5, result.BaseRate, 1e-12);
        Assert.Equal(10, result.Reliability.Count);
        Assert.Equal((0.05, 0.0, 1), (result.Reliability[0].ForecastMean, result.Reliability[0].ObservedFrequency, result.Reliability[0].Count));
        Assert.Equal((0.15, 0.5, 2), (result.Reliability[1].ForecastMean, result.Reliability[1].ObservedFrequency, result.Reliability[1].Count));
        Assert.Equal((0.55, 0.0, 1), (result.Reliability[5].ForecastMean, result.Reliability[5].ObservedFrequency, result.Reliability[5].Count));
        Assert.Equal(0.975, result.Reliability[9].ForecastMean, 1e-12);
        Assert.Equal((1.0, 2), (result.Reliability[9].ObservedFrequency, result.Reliability[9].Count));
        Assert.Equal(0, result.Reliability[3].Count);
        Assert.True(double.IsNaN(result.Reliability[3].ForecastMean));
    }

    [Fact]
    public void NoCaseGivesNaNScoresAndEmptyBins()
    {
        var result = new ThresholdScoreAccumulator().Result();

        Assert.Equal(0, result.Count);
        Assert.True(double.IsNaN(result.Brier));
        Assert.True(double.IsNaN(result.BrierSkill));
        Assert.All(result.Reliability, b => Assert.Equal(0, b.Count));
    }

    [Fact]
    public void AnEventThatNeverVariesInAMonthHasNoSkillDefined()
    {
        var scores = new ThresholdScoreAccumulator();
        scores.Add(0.2, false, 6);
        scores.Add(0.1, false, 6);

        var result = scores.Result();

        Assert.Equal((0.04 + 0.01) / 2, result.Brier, 1e-12);
        Assert.Equal(0, result.ClimatologyBrier);
        Assert.True(double.IsNaN(result.BrierSkill));
    }
}
