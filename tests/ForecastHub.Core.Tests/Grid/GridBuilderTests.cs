using ForecastHub.Core.Grid;
using ForecastHub.Core.Tests.Support;

namespace ForecastHub.Core.Tests.Grid;

public sealed class GridBuilderTests
{
    private static readonly DateTimeOffset T0 = new(2024, 5, 1, 10, 0, 0, TimeSpan.Zero);

    [Fact]
    public void HourlyStepIsTheMeanOfReadingsInsideTheHalfOpenHour()
    {
        GridReading[] readings =
        [
            new(T0, 1.0), new(T0.AddMinutes(30), 2.0), new(T0.AddMinutes(59).AddSeconds(59), 6.0),
            new(T0.AddHours(1), 10.0),
        ];

        var grid = GridBuilder.Build(readings, SomeGrid.Hourly());

        Assert.Equal(2, grid.Count);
        Assert.Equal(3.0, grid.Values[0], 12);
        Assert.Equal(10.0, grid.Values[1], 12);
        Assert.Equal(T0, grid.Times[0]);
    }

    [Fact]
    public void ReadingsWithOffsetsLandInTheSameUtcHour()
    {
        GridReading[] readings = [new(new DateTimeOffset(2024, 5, 1, 12, 15, 0, TimeSpan.FromHours(2)), 4.0), new(T0.AddMinutes(45), 8.0)];

        var grid = GridBuilder.Build(readings, SomeGrid.Hourly("Europe/Berlin"));

        Assert.Equal(1, grid.Count);
        Assert.Equal(6.0, grid.Values[0], 12);
        Assert.Equal(TimeSpan.FromHours(2), grid.Times[0].Offset);
    }

    [Fact]
    public void FlaggedAndNonFiniteReadingsAreLeftOut()
    {
        GridReading[] readings =
        [
            new(T0, 1.0), new(T0.AddMinutes(10), 50.0, Flagged: true), new(T0.AddMinutes(20), double.NaN),
            new(T0.AddMinutes(30), double.PositiveInfinity), new(T0.AddMinutes(40), 3.0),
        ];

        var grid = GridBuilder.Build(readings, SomeGrid.Hourly());

        Assert.Equal(2.0, Assert.Single(grid.Values), 12);
    }

    [Fact]
    public void UnsortedReadingsGiveTheSameGridAsSortedOnes()
    {
        var readings = SomeGrid.HourlyReadings(T0, 30, i => Math.Sin(i));
        readings.RemoveRange(10, 5);
        var shuffled = readings.OrderBy(r => (r.Time.Ticks * 7919) % 1000).ToArray();

        var a = GridBuilder.Build(readings, SomeGrid.Hourly());
        var b = GridBuilder.Build(shuffled, SomeGrid.Hourly());

        Assert.Equal(a.Values, b.Values);
        Assert.Equal(a.Segments, b.Segments);
    }

    [Fact]
    public void GapOfThreeStepsIsInterpolatedLinearlyAndReported()
    {
        var readings = SomeGrid.HourlyReadings(T0, 10, i => i * 2.0);
        readings.RemoveRange(3, 3);

        var grid = GridBuilder.Build(readings, SomeGrid.Hourly());

        Assert.Equal(10, grid.Count);
        Assert.Equal([6.0, 8.0, 10.0], grid.Values[3..6]);
        Assert.Equal([false, false, false, true, true, true, false, false, false, false], grid.Interpolated);
        Assert.Equal(3, grid.InterpolatedCount);
        Assert.Equal(7, grid.ObservedCount);
        var gap = Assert.Single(grid.Gaps);
        Assert.Equal(new GridGap(3, 3, T0.AddHours(3), T0.AddHours(5), Interpolated: true), gap);
        Assert.Equal(new GridSegment(0, 10, T0, T0.AddHours(9)), Assert.Single(grid.Segments));
    }

    [Fact]
    public void GapLongerThanTheLimitSplitsTheSeriesIntoSegments()
    {
        var readings = SomeGrid.HourlyReadings(T0, 12, i => i);
        readings.RemoveRange(3, 4);

        var grid = GridBuilder.Build(readings, SomeGrid.Hourly());

        Assert.Equal(12, grid.Count);
        Assert.All(grid.Values[3..7], v => Assert.True(double.IsNaN(v)));
        Assert.Equal(0, grid.InterpolatedCount);
        Assert.Equal([new GridSegment(0, 3, T0, T0.AddHours(2)), new GridSegment(7, 5, T0.AddHours(7), T0.AddHours(11))], grid.Segments);
        Assert.False(Assert.Single(grid.Gaps).Interpolated);
        Assert.Equal([[0.0, 1, 2], [7.0, 8, 9, 10, 11]], grid.SegmentValues());
    }

    [Fact]
    public void GapLimitOfZeroNeverInterpolates()
    {
        var readings = SomeGrid.HourlyReadings(T0, 5, i => i);
        readings.RemoveAt(2);

        var grid = GridBuilder.Build(readings, SomeGrid.Hourly(maxGap: 0));

        Assert.Equal(2, grid.Segments.Length);
    }

    [Fact]
    public void MissingNewestStepsUpToTheRequestedEndAreReportedAndNotInterpolated()
    {
        var readings = SomeGrid.HourlyReadings(T0, 6, i => i);

        var grid = GridBuilder.Build(readings, SomeGrid.Hourly(), T0, T0.AddHours(8));

        Assert.Equal(8, grid.Count);
        Assert.Equal(5, grid.LastValueIndex);
        Assert.Equal(new GridGap(6, 2, T0.AddHours(6), T0.AddHours(7), Interpolated: false), Assert.Single(grid.Gaps));
    }

    [Fact]
    public void DailyMinAndMaxCoverTheTwentyThreeHourSpringForwardDayInBerlin()
    {
        // 2024-03-31 in Europe/Berlin runs from 2024-03-30T23:00Z to 2024-03-31T22:00Z (23 hours).
        var start = new DateTimeOffset(2024, 3, 29, 23, 0, 0, TimeSpan.Zero);
        var readings = SomeGrid.HourlyReadings(start, 24 + 23 + 24, i => i);

        var min = GridBuilder.Build(readings, SomeGrid.Daily(DailyStatistic.Min));
        var max = GridBuilder.Build(readings, SomeGrid.Daily(DailyStatistic.Max));

        Assert.Equal(3, min.Count);
        Assert.Equal([0.0, 24, 47], min.Values);
        Assert.Equal([23.0, 46, 70], max.Values);
        Assert.Equal(new DateTimeOffset(2024, 3, 31, 0, 0, 0, TimeSpan.FromHours(1)), min.Times[1]);
        Assert.Equal(new DateTimeOffset(2024, 4, 1, 0, 0, 0, TimeSpan.FromHours(2)), min.Times[2]);
        Assert.Equal(TimeSpan.FromHours(23), min.Times[2] - min.Times[1]);
    }

    [Fact]
    public void DailyMaxCoversTheTwentyFiveHourFallBackDayInBerlin()
    {
        // 2024-10-27 in Europe/Berlin runs from 2024-10-26T22:00Z to 2024-10-27T23:00Z (25 hours).
        var start = new DateTimeOffset(2024, 10, 25, 22, 0, 0, TimeSpan.Zero);
        var readings = SomeGrid.HourlyReadings(start, 24 * 3 + 1, i => i);

        var max = GridBuilder.Build(readings, SomeGrid.Daily(DailyStatistic.Max));
        var min = GridBuilder.Build(readings, SomeGrid.Daily(DailyStatistic.Min));

        Assert.Equal([23.0, 48, 72], max.Values);
        Assert.Equal([0.0, 24, 49], min.Values);
        Assert.Equal(TimeSpan.FromHours(25), max.Times[2] - max.Times[1]);
    }

    [Fact]
    public void DailyMeanIsTheMeanOfTheHourlyMeans()
    {
        var midnight = new DateTimeOffset(2024, 6, 1, 0, 0, 0, TimeSpan.FromHours(2));
        GridReading[] readings =
        [
            new(midnight.AddHours(1), 0.0), new(midnight.AddHours(1).AddMinutes(1), 0.0), new(midnight.AddHours(1).AddMinutes(2), 0.0),
            new(midnight.AddHours(5), 12.0),
        ];

        var grid = GridBuilder.Build(readings, SomeGrid.Daily(DailyStatistic.Mean));

        Assert.Equal(6.0, Assert.Single(grid.Values), 12);
    }

    [Fact]
    public void NoReadingsGiveAnEmptyGrid()
    {
        var grid = GridBuilder.Build([], SomeGrid.Hourly());

        Assert.Equal(0, grid.Count);
        Assert.Empty(grid.Segments);
        Assert.Equal(-1, grid.LastValueIndex);
    }

    [Fact]
    public void ASpanWithOnlyFlaggedReadingsIsAllMissingWithNoSegments()
    {
        GridReading[] readings = [new(T0, 1.0, Flagged: true), new(T0.AddHours(2), 2.0, Flagged: true)];

        var grid = GridBuilder.Build(readings, SomeGrid.Hourly(), T0, T0.AddHours(4));

        Assert.Equal(4, grid.Count);
        Assert.All(grid.Values, v => Assert.True(double.IsNaN(v)));
        Assert.Empty(grid.Segments);
        Assert.Equal(new GridGap(0, 4, T0, T0.AddHours(3), Interpolated: false), Assert.Single(grid.Gaps));
    }

    [Fact]
    public void UnknownTimeZoneIsAnArgumentError()
    {
        var e = Assert.Throws<ArgumentException>(() => GridBuilder.Build([new(T0, 1.0)], SomeGrid.Hourly("Mars/Olympus")));

        Assert.Contains("Mars/Olympus", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void GridRoundTripsThroughJson()
    {
        var readings = SomeGrid.HourlyReadings(T0, 12, i => i);
        readings.RemoveRange(3, 4);
        var grid = GridBuilder.Build(readings, SomeGrid.Hourly("Europe/Berlin"));

        var copy = System.Text.Json.JsonSerializer.Deserialize<TimeGrid>(
            System.Text.Json.JsonSerializer.Serialize(grid, JsonNaN.Options), JsonNaN.Options)!;

        Assert.Equal(grid.Times, copy.Times);
        Assert.Equal(grid.Values, copy.Values);
        Assert.Equal(grid.Segments, copy.Segments);
    }
}

public sealed class GridUntilTests
{
    [Fact]
    public void UntilDropsLaterStepsAndUndoesInterpolationThatUsedThem()
    {
        var values = new[] { 1.0, 2, double.NaN, double.NaN, 5, 6 };
        var grid = SomeGrid.HourlyGrid(values);

        var known = grid.Until(3);

        Assert.Equal(4, known.Count);
        Assert.True(grid.Interpolated[2]);
        Assert.True(double.IsNaN(known.Values[2]) && double.IsNaN(known.Values[3]));
        Assert.Equal(new GridSegment(0, 2, grid.Times[0], grid.Times[1]), Assert.Single(known.Segments));
        Assert.Equal(1, known.LastValueIndex);
    }
}
