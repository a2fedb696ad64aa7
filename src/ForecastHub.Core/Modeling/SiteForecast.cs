using ForecastHub.Core.Forecasting;
using ForecastHub.Core.Risk;

namespace ForecastHub.Core.Modeling;

public enum ThresholdDirection
{
    /// <summary>Probability that the day's minimum falls below the threshold.</summary>
    Below,

    /// <summary>Probability that the day's maximum rises above the threshold.</summary>
    Above,
}

public sealed record Threshold(double Value, ThresholdDirection Direction);

/// <summary>One forecast step; Horizon counts steps from the newest data (so it exceeds the step's
/// position when the newest grid steps were missing).</summary>
public sealed record ForecastStep(DateTimeOffset Time, int Horizon, double Mean, double Sd, IReadOnlyList<PredictionInterval> Intervals)
{
    /// <summary>Chance of the step's value lying beyond each threshold of the risk request, from the interval's distribution.</summary>
    public IReadOnlyList<StepProbability> Probabilities { get; init; } = [];
}

/// <summary>A distribution summarised by its mean and central intervals.</summary>
public sealed record DistributionSummary(double Mean, IReadOnlyList<PredictionInterval> Intervals)
{
    /// <summary>A simulated sample's mean and central intervals (R quantile type 7).</summary>
    internal static DistributionSummary OfSample(double[] values, IReadOnlyList<double> levels)
    {
        var quantiles = OrderStatistics.TypeSevenQuantiles(values.ToArray(), [.. levels.SelectMany(l => new[] { (1 - l) / 2, (1 + l) / 2 })]);
        return new DistributionSummary(values.Average(), [.. levels.Select((l, i) => new PredictionInterval(l, quantiles[2 * i], quantiles[(2 * i) + 1]))]);
    }
}

public sealed record ThresholdProbability(double Threshold, ThresholdDirection Direction, double Probability);

/// <summary>Next local day (hourly sites): min, max and mean of the day's hourly values over Monte Carlo paths.</summary>
public sealed record NextDaySummary(
    DateOnly Date,
    DateTimeOffset From,
    DateTimeOffset To,
    DistributionSummary Min,
    DistributionSummary Max,
    DistributionSummary Mean,
    IReadOnlyList<ThresholdProbability> Probabilities,
    int Paths,
    int Seed);

/// <summary>
/// A forecast path. LastData is the newest grid step with a value (the true forecast origin);
/// MissingSteps counts grid steps after it that had no value; Steps start after the grid's last step.
/// IntervalMethod is the method actually used (gaussian when a model has no calibration table).
/// </summary>
public sealed record SiteForecast(
    DateTimeOffset LastData,
    int MissingSteps,
    IntervalMethod IntervalMethod,
    IReadOnlyList<ForecastStep> Steps,
    NextDaySummary? NextDay,
    IReadOnlyList<string> Notes)
{
    /// <summary>Per threshold and window of the risk request; empty without one.</summary>
    public IReadOnlyList<WindowRisk> Risk { get; init; } = [];
}
