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
    IReadOnlyList<RiskResponse> Risk,
    string Confidence,
    ConfidenceReason? ConfidenceReason,
    ForecastDataGap? MissingRecentData,
    IReadOnlyList<string> Cautions);

/// <summary>
/// One threshold over one window (DESIGN section 10). <c>id</c> names the site threshold (null for a
/// <c>below=</c>/<c>above=</c> of the query); <c>probability</c> is the chance of at least one step beyond
/// it in the window, from seeded sample paths; <c>firstCrossing</c> the start of the first step beyond it
/// over the paths that cross (null when none does); <c>expectedHoursBeyond</c> null for daily sites;
/// <c>extreme</c> the window's minimum (below) or maximum (above).
/// </summary>
public sealed record RiskResponse(
    string? Id,
    double Threshold,
    string Direction,
    double? AlertProbability,
    RiskWindowResponse Window,
    double Probability,
    CrossingResponse? FirstCrossing,
    double? ExpectedHoursBeyond,
    DaySummaryValue Extreme);

public sealed record RiskWindowResponse(string Name, DateTimeOffset From, DateTimeOffset To);

public sealed record CrossingResponse(DateTimeOffset Median, DateTimeOffset P10, DateTimeOffset P90);

/// <summary>Why confidence is reduced: <c>code</c> is the site's health state (stale, sensor-suspect or drifting).</summary>
public sealed record ConfidenceReason(string Code, string Message);

/// <summary>The model used; <c>intervalMethod</c> is what the intervals actually came from (gaussian when no calibration exists).</summary>
public sealed record ForecastModelUsed(int Order, string Method, DateTimeOffset FittedAt, string IntervalMethod);

public sealed record ForecastStepResponse(DateTimeOffset Time, double Mean, double Sd, IReadOnlyList<ForecastInterval> Intervals, IReadOnlyList<StepProbabilityResponse> Probabilities);

/// <summary>Chance that the step's value lies beyond the threshold (same distribution as the intervals); <c>id</c> as in <see cref="RiskResponse"/>.</summary>
public sealed record StepProbabilityResponse(string? Id, double Threshold, string Direction, double Probability);

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
