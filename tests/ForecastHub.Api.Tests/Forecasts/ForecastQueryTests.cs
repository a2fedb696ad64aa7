using ForecastHub.Api.Forecasts;

namespace ForecastHub.Api.Tests.Forecasts;

/// <summary>Query parsing of GET .../forecast: ranges of DESIGN section 5 as documented in docs/service.md, and the field each error names.</summary>
public sealed class ForecastQueryTests
{
    private static (ForecastQuery? Query, string? Field, string? Error) Hourly(string? steps = null, string? levels = null, string? below = null, string? above = null) =>
        ForecastQuery.Parse(isDaily: false, steps, levels, below, above);

    [Fact]
    public void EmptyQueryGivesTheDefaults()
    {
        var hourly = Hourly().Query!;
        var daily = ForecastQuery.Parse(isDaily: true, null, null, null, null).Query!;

        Assert.Equal(48, hourly.Steps);
        Assert.Equal(3, daily.Steps);
        Assert.Equal([80.0, 95.0], hourly.Levels);
        Assert.Empty(hourly.Below);
        Assert.Empty(hourly.Above);
    }

    [Theory]
    [InlineData("1", true)]
    [InlineData("240", true)]
    [InlineData("0", false)]
    [InlineData("241", false)]
    [InlineData("-3", false)]
    [InlineData("4.5", false)]
    [InlineData("ten", false)]
    public void HourlyStepsRunFrom1To240(string steps, bool valid)
    {
        var (query, field, error) = Hourly(steps);
        Assert.Equal(valid, query is not null);
        if (!valid)
        {
            Assert.Equal("steps", field);
            Assert.Contains("1 to 240", error, StringComparison.Ordinal);
        }
    }

    [Fact]
    public void DailyStepsStopAt14()
    {
        Assert.NotNull(ForecastQuery.Parse(true, "14", null, null, null).Query);
        var (query, field, error) = ForecastQuery.Parse(true, "15", null, null, null);
        Assert.Null(query);
        Assert.Equal("steps", field);
        Assert.Contains("1 to 14", error, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("0")]
    [InlineData("100")]
    [InlineData("80,abc")]
    [InlineData("10,20,30,40,50,60")]
    [InlineData("NaN")]
    public void BadLevelsAreRefusedNamingTheField(string levels)
    {
        var (query, field, error) = Hourly(levels: levels);
        Assert.Null(query);
        Assert.Equal("levels", field);
        Assert.False(string.IsNullOrEmpty(error));
    }

    [Fact]
    public void LevelsAreSortedAndRepeatsDropped()
    {
        var query = Hourly(levels: "95, 50,80,95").Query!;
        Assert.Equal([50.0, 80.0, 95.0], query.Levels);
        Assert.Equal(Hourly(levels: "50,80,95").Query!.Key, query.Key);
    }

    [Theory]
    [InlineData("below", "-95.1")]
    [InlineData("below", "65.5")]
    [InlineData("above", "1,2,3,4,5,6,7,8,9,10,11")]
    [InlineData("above", "1e3")]
    public void ThresholdsOutsideMinus95To65OrTooManyAreRefused(string name, string value)
    {
        var (query, field, _) = name == "below" ? Hourly(below: value) : Hourly(above: value);
        Assert.Null(query);
        Assert.Equal(name, field);
    }

    [Fact]
    public void ThresholdsAtTheLimitsAreAccepted()
    {
        var query = Hourly(below: "-95,0", above: "65").Query!;
        Assert.Equal([-95.0, 0.0], query.Below);
        Assert.Equal([65.0], query.Above);
    }

    [Fact]
    public void DifferentQueriesHaveDifferentKeys() =>
        Assert.NotEqual(Hourly(below: "0").Query!.Key, Hourly(above: "0").Query!.Key);
}
