using ForecastHub.Core.Modeling;

namespace ForecastHub.Core.Risk;

/// <summary>A level that matters at a site; <see cref="Id"/> is the site threshold's id, null for one asked in a query.</summary>
public sealed record RiskThreshold(string? Id, ThresholdDirection Direction, double ValueC)
{
    /// <summary>True when <paramref name="value"/> lies beyond the threshold (strictly below or strictly above).</summary>
    public bool IsBeyond(double value) => Direction == ThresholdDirection.Below ? value < ValueC : value > ValueC;
}

/// <summary>A site's night in local clock time; an end at or before the start means the night runs past midnight.</summary>
public sealed record NightHours(TimeOnly Start, TimeOnly End)
{
    public static NightHours Default { get; } = new(new TimeOnly(18, 0), new TimeOnly(9, 0));
}

/// <summary>What to assess: thresholds, the site's night (hourly sites) and the time the windows are taken from.</summary>
public sealed record RiskRequest(IReadOnlyList<RiskThreshold> Thresholds, NightHours Night, DateTimeOffset Now);

/// <summary>Chance that one step's value lies beyond a threshold, from the step's predictive distribution.</summary>
public sealed record StepProbability(string? Id, double Threshold, ThresholdDirection Direction, double Probability);

/// <summary>A named span of time the risk is assessed over: <c>night</c> or <c>next24h</c>.</summary>
public sealed record RiskWindow(string Name, DateTimeOffset From, DateTimeOffset To)
{
    public const string Night = "night";
    public const string Next24h = "next24h";
}

/// <summary>Quantiles (R type 1) of the start of the first step beyond the threshold, over the paths that cross.</summary>
public sealed record CrossingTimes(DateTimeOffset Median, DateTimeOffset P10, DateTimeOffset P90);

/// <summary>
/// Risk of one threshold over one window: the chance of at least one step beyond it, when the first
/// crossing is likely, the expected hours beyond (null for daily sites) and the window's extreme
/// (its minimum for a below threshold, its maximum for an above one).
/// </summary>
public sealed record WindowRisk(
    RiskThreshold Threshold,
    RiskWindow Window,
    double Probability,
    CrossingTimes? FirstCrossing,
    double? ExpectedHoursBeyond,
    DistributionSummary Extreme);
