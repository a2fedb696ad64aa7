using ForecastHub.Core.Quality;
using static ForecastHub.Core.Tests.Quality.SomeQualitySeries;

namespace ForecastHub.Core.Tests.Quality;

/// <summary>The QC rules of DESIGN section 3 (thresholds there; no outside reference exists for
/// these rules, they are the product's own definitions).</summary>
public sealed class QualityChecksTests
{
    [Fact]
    public void EmptyInputGivesNoFlags() => Assert.Empty(Flags([]));

    [Fact]
    public void ASingleReadingCanOnlyBeOutOfRange()
    {
        Assert.Equal([QualityFlags.None], Flags(Hourly(20)));
        Assert.Equal([QualityFlags.OutOfRange], Flags(Hourly(61)));
    }

    [Fact]
    public void NonFiniteValuesAndUnsortedTimesAreRefused()
    {
        Assert.Throws<ArgumentException>(() => Flags(Hourly(1, double.NaN, 2)));
        Assert.Throws<ArgumentException>(() => Flags(Hourly(1, double.PositiveInfinity)));
        var series = Hourly(1, 2);
        Assert.Throws<ArgumentException>(() => Flags([series[1], series[0]]));
        Assert.Throws<ArgumentException>(() => Flags([series[0], series[0]]));
    }

    [Fact]
    public void SiteLimitsAreInclusive()
    {
        var limits = QualityLimits.Default with { MinC = -5, MaxC = 30 };
        Assert.Equal([QualityFlags.None, QualityFlags.None, QualityFlags.OutOfRange, QualityFlags.OutOfRange],
            QualityChecks.Evaluate(Daily(-5, 30, -5.01, 30.01), limits));
    }

    [Fact]
    public void AReadingThatJumpsAwayFromBothNeighboursIsASpike()
    {
        Assert.Equal([QualityFlags.None, QualityFlags.Spike, QualityFlags.None], Flags(Hourly(10, 25, 11)));
        Assert.Equal([QualityFlags.None, QualityFlags.Spike, QualityFlags.None], Flags(Hourly(10, -5, 11)));
    }

    [Fact]
    public void AStepChangeIsNotASpike()
    {
        // A jump up that stays up moves in one direction only: a front, or a sensor moved.
        Assert.All(Flags(Hourly(10, 25, 26, 25.5)), f => Assert.Equal(QualityFlags.None, f));
    }

    [Fact]
    public void TheSpikeThresholdScalesWithTheHoursBetweenReadings()
    {
        // 15 C away over 1 h is a spike; 15 C over 2 h is 7.5 C per hour, inside the limit of 10.
        Assert.Equal(QualityFlags.Spike, Flags(Hourly(10, 25, 10))[1]);
        Assert.Equal(QualityFlags.None, Flags(Evenly(TimeSpan.FromHours(2), 10, 25, 10))[1]);
    }

    [Fact]
    public void ReadingsLessThanAnHourApartUseOneHourForTheSpikeThreshold()
    {
        // Ten-minute data: a 9 C jump is under 10 C (the at-least-one-hour floor), so no spike.
        Assert.Equal(QualityFlags.None, Flags(Evenly(TimeSpan.FromMinutes(10), 10, 19, 10))[1]);
        Assert.Equal(QualityFlags.Spike, Flags(Evenly(TimeSpan.FromMinutes(10), 10, 20.5, 10))[1]);
    }

    [Fact]
    public void TheFirstAndLastReadingsAreNeverSpikes()
    {
        Assert.All(Flags(Hourly(40, 10, 10.5, 40)), f => Assert.Equal(QualityFlags.None, f & QualityFlags.Spike));
    }

    [Fact]
    public void SixIdenticalReadingsOverSixHoursAreAFlatLine()
    {
        var flags = Flags(Hourly(9, 4.2, 4.2, 4.2, 4.2, 4.2, 4.2, 4.2, 9));
        Assert.Equal(QualityFlags.None, flags[0]);
        Assert.All(flags[1..8], f => Assert.Equal(QualityFlags.FlatLine, f));
        Assert.Equal(QualityFlags.None, flags[8]);
    }

    [Fact]
    public void FiveIdenticalReadingsAreNotAFlatLine()
    {
        Assert.All(Flags(Daily(3, 3, 3, 3, 3)), f => Assert.Equal(QualityFlags.None, f));
    }

    [Fact]
    public void SixIdenticalReadingsSpanningLessThanTheFlatlineHoursAreNotAFlatLine()
    {
        // Six ten-minute readings span 50 minutes, well under six hours.
        Assert.All(Flags(Evenly(TimeSpan.FromMinutes(10), 5, 5, 5, 5, 5, 5)), f => Assert.Equal(QualityFlags.None, f));
        // 36 ten-minute readings span 5 h 50 min; 37 span 6 h.
        Assert.All(Flags(Evenly(TimeSpan.FromMinutes(10), Enumerable.Repeat(5.0, 36).ToArray())), f => Assert.Equal(QualityFlags.None, f));
        Assert.All(Flags(Evenly(TimeSpan.FromMinutes(10), Enumerable.Repeat(5.0, 37).ToArray())), f => Assert.Equal(QualityFlags.FlatLine, f));
    }

    [Fact]
    public void EqualDailyMaximaOnThreeOrFourDaysRunningAreNeverFlagged()
    {
        Assert.All(Flags(Daily(21.3, 24.0, 24.0, 24.0, 22.1)), f => Assert.Equal(QualityFlags.None, f));
        Assert.All(Flags(Daily(21.3, 24.0, 24.0, 24.0, 24.0, 22.1)), f => Assert.Equal(QualityFlags.None, f));
    }

    [Fact]
    public void AFrontMovingEighteenDegreesInADayIsNeverFlagged()
    {
        // Daily data: 26 C then 8 C then 25 C is a cold day between warm ones, 18 C in 24 h.
        Assert.All(Flags(Daily(26, 8, 25)), f => Assert.Equal(QualityFlags.None, f));
        // Hourly data: a front dropping 18 C over a day and recovering.
        var front = Enumerable.Range(0, 24).Select(h => 26 - (0.75 * h)).Concat(Enumerable.Range(0, 24).Select(h => 8 + (0.75 * h)));
        Assert.All(Flags(Hourly(front.ToArray())), f => Assert.Equal(QualityFlags.None, f));
        // A sharp front: 9 C within the hour (inside the 10 C per hour limit), sustained.
        Assert.All(Flags(Hourly(24, 23.5, 14.5, 14, 13.8)), f => Assert.Equal(QualityFlags.None, f));
    }

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(3)]
    public void TwoYearsOfNormalDailyMaximaAreNeverFlagged(int seed)
    {
        Assert.All(Flags(DailyMaxima(730, seed)), f => Assert.Equal(QualityFlags.None, f));
    }

    [Theory]
    [InlineData(5, 1)]
    [InlineData(12, 2)]
    public void NormalHourlyDataWithAStrongDailyCycleIsNeverFlagged(double amplitude, int seed)
    {
        Assert.All(Flags(HourlyCycle(24 * 60, amplitude, seed)), f => Assert.Equal(QualityFlags.None, f));
    }

    [Fact]
    public void FlagsCombine()
    {
        // A stuck sensor reading 70 C: out of range and a flat line at once.
        var flags = Flags(Hourly(10, 70, 70, 70, 70, 70, 70, 70, 10));
        Assert.All(flags[1..8], f => Assert.Equal(QualityFlags.OutOfRange | QualityFlags.FlatLine, f));
        Assert.Equal(["out-of-range", "flat-line"], QualityFlagNames.Of(flags[1]));
        Assert.Empty(QualityFlagNames.Of(QualityFlags.None));
    }
}
