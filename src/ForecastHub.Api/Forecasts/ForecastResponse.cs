namespace ForecastHub.Api.Forecasts;

/// <summary>GET .../forecast: the path with intervals, the next local day, the model used, and cautions (DESIGN section 5).</summary>
public sealed record ForecastResponse(
    string SiteId,
    DateTimeOffset IssuedAt,
    DateTimeOffset Origin,
    string Unit,
    string HealthState,
    ForecastModelUsed Model,
    IReadOnlyList<ForecastStepResponse> Steps,
    NextDaySummaryResponse? NextDay,
    ForecastDataGap? MissingRecentData,
    IReadOnlyList<string> Cautions);

/// <summary>The model used; <c>intervalMethod</c> is what the intervals actually came from (gaussian when no calibration exists).</summary>
public sealed record ForecastModelUsed(int Order, string Method, DateTimeOffset FittedAt, string IntervalMethod);

public sealed record ForecastStepResponse(DateTimeOffset Time, double Mean, double Sd, IReadOnlyList<ForecastInterval> Intervals);

public sealed record ForecastInterval(double Level, double Lower, double Upper);

/// <summary>The next local day: quantile summaries of its min, max and mean, and threshold probabilities.</summary>
public sealed record NextDaySummaryResponse(
    DateOnly Date,
    DaySummaryValue Min,
    DaySummaryValue Max,
    DaySummaryValue Mean,
    IReadOnlyList<ThresholdProbabilityResponse> Probabilities);

public sealed record DaySummaryValue(double Mean, IReadOnlyList<ForecastInterval> Intervals);

/// <summary>Direction is "below" (the day's minimum drops below the threshold) or "above" (its maximum exceeds it).</summary>
public sealed record ThresholdProbabilityResponse(double Threshold, string Direction, double Probability);

/// <summary>Present when the newest grid steps before the origin had no data: the forecast starts from the last data and its intervals are wider.</summary>
public sealed record ForecastDataGap(DateTimeOffset LastDataAt, int MissingSteps, string Message);
