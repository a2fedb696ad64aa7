using ForecastHub.Core.Risk;
using ForecastHub.Core.Verification;

namespace ForecastHub.Api.Verification;

/// <summary>GET .../verification: a rolling-origin backtest of the site's history and the live scores of archived day-ahead forecasts.</summary>
public sealed record VerificationResponse(string SiteId, DateTimeOffset EvaluatedAt, BacktestResponse? Backtest, LiveScoresResponse Live);

/// <summary>
/// The backtest: refit every <c>RefitEveryDays</c> over the last <c>Days</c> of the grid, forecast
/// the next day from each daily origin; scores per horizon (steps ahead). Null when the history is
/// too short for one origin.
/// </summary>
public sealed record BacktestResponse(
    DateTimeOffset From,
    DateTimeOffset To,
    int Origins,
    int RefitEveryDays,
    IReadOnlyList<ScoresResponse> Horizons,
    ScoresResponse Pooled)
{
    /// <summary>Per threshold (the site's, and any asked for), the verification of its next-24-hour risk.</summary>
    public IReadOnlyList<ThresholdScoresResponse> Thresholds { get; init; } = [];

    /// <summary>The core's backtest in the field names of DESIGN.md; <paramref name="thresholds"/> are those it verified, in its order.
    /// Null when the backtest had no origin.</summary>
    public static BacktestResponse? Of(BacktestResult? result, IReadOnlyList<RiskThreshold> thresholds)
    {
        ArgumentNullException.ThrowIfNull(thresholds);
        return result is null ? null : new BacktestResponse(
            result.From,
            result.To,
            result.Origins,
            result.RefitEveryDays,
            [.. result.Horizons.Where(s => s.Count > 0).Select(s => ScoresResponse.From(s, s.Horizon))],
            ScoresResponse.From(result.Pooled, null))
        {
            Thresholds = [.. thresholds.Select((t, i) => ThresholdScoresResponse.From(t, RiskWindow.Next24h, result.Thresholds[i]))],
        };
    }
}

/// <summary>
/// Verification of one threshold's risk over a window: the Brier score, its skill against the base
/// rate of the same calendar month (1 - BS / BS_ref) and a reliability table of 10 probability bins.
/// <c>id</c> is the site threshold's id, null for one asked for in the request. A score that is not a
/// finite number (skill when the event never happened, so the base rate made no error) is null and
/// <c>notes</c> says which: JSON has no NaN or Infinity.
/// </summary>
public sealed record ThresholdScoresResponse(
    string? Id,
    double Threshold,
    string Direction,
    string Window,
    int Count,
    double? BaseRate,
    double? Brier,
    double? ClimatologyBrier,
    double? BrierSkill,
    IReadOnlyList<ReliabilityBinResponse> Reliability,
    IReadOnlyList<string> Notes)
{
    public static ThresholdScoresResponse From(RiskThreshold threshold, string window, ThresholdVerification scores)
    {
        ArgumentNullException.ThrowIfNull(threshold);
        ArgumentNullException.ThrowIfNull(scores);
        var notes = new List<string>();
        double? Finite(double value, string name)
        {
            if (double.IsFinite(value))
            {
                return value;
            }
            notes.Add($"{name} is not a finite number (no events or no forecasts to score it against) and is given as null.");
            return null;
        }
        return new(threshold.Id, threshold.ValueC, threshold.Direction == Core.Modeling.ThresholdDirection.Below ? "below" : "above", window,
            scores.Count, Finite(scores.BaseRate, "baseRate"), Finite(scores.Brier, "brier"), Finite(scores.ClimatologyBrier, "climatologyBrier"),
            Finite(scores.BrierSkill, "brierSkill"),
            [.. scores.Reliability.Select(b => new ReliabilityBinResponse(b.From, b.To,
                double.IsFinite(b.ForecastMean) ? b.ForecastMean : null, double.IsFinite(b.ObservedFrequency) ? b.ObservedFrequency : null, b.Count))],
            notes);
    }
}

/// <summary>Forecasts with a probability in [from, to): their mean, how often the event happened, how many (null: none in the bin).</summary>
public sealed record ReliabilityBinResponse(double From, double To, double? ForecastMean, double? ObservedFrequency, int Count);

/// <summary>Scores as in DESIGN section 4. Bias is mean(forecast - observed); levels are percentages.
/// A score that is not a finite number (skill against a reference that made no error, say) is null,
/// and <c>Notes</c> says which and why: JSON has no NaN or Infinity.</summary>
public sealed record ScoresResponse(
    int? Horizon,
    int Count,
    double? Mae,
    double? Rmse,
    double? Bias,
    double? PersistenceMae,
    double? ClimatologyMae,
    double? SkillVsPersistence,
    double? SkillVsClimatology,
    double? Crps,
    IReadOnlyList<IntervalScoresResponse> Intervals,
    IReadOnlyList<string> Notes)
{
    public static ScoresResponse From(HorizonScores scores, int? horizon)
    {
        ArgumentNullException.ThrowIfNull(scores);
        var notes = new List<string>();
        double? Finite(double value, string name)
        {
            if (double.IsFinite(value))
            {
                return value;
            }
            notes.Add(name switch
            {
                "skillVsPersistence" => "skillVsPersistence is null: persistence (the value a day earlier) made no error over these pairs, so skill against it is undefined.",
                "skillVsClimatology" => "skillVsClimatology is null: climatology made no error over these pairs, so skill against it is undefined.",
                _ => $"{name} is null: it is not a finite number for these pairs.",
            });
            return null;
        }

        var intervals = scores.Intervals.Select(i => new IntervalScoresResponse(Math.Round(i.Level * 100, 6),
            Finite(i.Coverage, "coverage"), Finite(i.MeanWidth, "meanWidth"), Finite(i.Winkler, "intervalScore"), Finite(i.Pinball, "pinball"))).ToList();
        return new(horizon, scores.Count, Finite(scores.Mae, "mae"), Finite(scores.Rmse, "rmse"), Finite(scores.Bias, "bias"),
            Finite(scores.PersistenceMae, "persistenceMae"), Finite(scores.ClimatologyMae, "climatologyMae"),
            Finite(scores.SkillVsPersistence, "skillVsPersistence"), Finite(scores.SkillVsClimatology, "skillVsClimatology"),
            Finite(scores.Crps, "crps"), intervals, [.. notes.Distinct(StringComparer.Ordinal)]);
    }
}

public sealed record IntervalScoresResponse(double Level, double? Coverage, double? MeanWidth, double? IntervalScore, double? Pinball);

/// <summary>Live scores over the last <c>Days</c> scored days (up to <see cref="VerificationService.MaxLiveDays"/>), pooled and per day.</summary>
public sealed record LiveScoresResponse(int Days, ScoresResponse? Pooled, IReadOnlyList<LiveDayResponse> Daily)
{
    /// <summary>Per site threshold, the verification of the archived step probabilities (window <c>step</c>: the event is the step's observed value beyond it).</summary>
    public IReadOnlyList<ThresholdScoresResponse> Thresholds { get; init; } = [];

    /// <summary>The window name of live threshold scores: each archived step is one case.</summary>
    public const string StepWindow = "step";
}

public sealed record LiveDayResponse(DateOnly Date, DateTimeOffset IssuedAt, int Points, double? Mae, double? Bias);
