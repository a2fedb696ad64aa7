using System.Globalization;

namespace ForecastHub.Core.Health;

/// <summary>
/// The model-health rules of DESIGN section 6 as one pure function. Every rule that applies adds a
/// reason; the state is the most urgent one among them (sensor-suspect, stale, warming-up,
/// drifting, then ok). NaN or null measures are not judged; zero readings in the last day never
/// make a flagged share.
/// </summary>
public static class ModelHealth
{
    public static HealthAssessment Evaluate(HealthInputs inputs, HealthOptions options)
    {
        ArgumentNullException.ThrowIfNull(inputs);
        ArgumentNullException.ThrowIfNull(options);
        var reasons = new List<HealthReason>();
        AddSensorReasons(inputs, options, reasons);
        AddStaleReasons(inputs, options, reasons);
        AddWarmingUpReasons(inputs, options, reasons);
        AddDriftReasons(inputs, options, reasons);

        // A stable sort keeps the rule order within a state.
        var ordered = reasons.OrderBy(r => HealthState.Urgency(r.State)).ToList();
        var state = ordered.Count == 0 ? HealthState.Ok : ordered[0].State;
        return new HealthAssessment(state, ordered, inputs.LastObservationAt, inputs.ModelFittedAt);
    }

    private static void AddSensorReasons(HealthInputs i, HealthOptions o, List<HealthReason> reasons)
    {
        if (i.NewestReadingsFlatLine)
        {
            reasons.Add(new(HealthReasonCode.FlatLine,
                "The newest readings form a flat line; check that the sensor is still measuring.",
                HealthState.SensorSuspect));
        }

        if (i.LastDayReadings > 0)
        {
            var share = (double)i.LastDayFlagged / i.LastDayReadings;
            if (share > o.MaxFlaggedShare)
            {
                reasons.Add(new(HealthReasonCode.FlaggedShareHigh,
                    Format($"{i.LastDayFlagged} of the last day's {i.LastDayReadings} readings ({share:P1}) were flagged by quality control (limit {o.MaxFlaggedShare:P1}); check the sensor and the site's quality limits."),
                    HealthState.SensorSuspect));
            }
        }
    }

    private static void AddStaleReasons(HealthInputs i, HealthOptions o, List<HealthReason> reasons)
    {
        var maxAge = i.IsDaily ? o.DailyDataMaxAge : o.HourlyDataMaxAge;
        if (i.LastObservationAt is { } last && i.Now - last > maxAge)
        {
            reasons.Add(new(HealthReasonCode.NoRecentData,
                Format($"The newest reading is from {last:O}, older than the {Describe(maxAge)} limit; check the logger's uploads."),
                HealthState.Stale));
        }

        if (i.UnservableModel is { } why)
        {
            reasons.Add(new(HealthReasonCode.ModelOutdated, why, HealthState.Stale));
        }

        var newerDataExists = i.LastObservationAt is { } obs && i.ModelDataEnd is { } end && obs > end;
        if (i.ModelFittedAt is { } fitted && newerDataExists && i.Now - fitted > o.ModelMaxAge)
        {
            reasons.Add(new(HealthReasonCode.ModelOutdated,
                Format($"The model was fitted at {fitted:O}, more than {Describe(o.ModelMaxAge)} ago, and newer data exists; a refit is due."),
                HealthState.Stale));
        }

        if (i.LastFitFailedAt is { } failed && (i.ModelFittedAt is null || failed > i.ModelFittedAt))
        {
            var what = i.ModelFittedAt is null ? "no model is serving yet" : "the previous model keeps serving";
            reasons.Add(new(HealthReasonCode.FitFailed,
                Format($"The fit at {failed:O} failed ({i.LastFitError ?? "no detail"}); {what}."),
                HealthState.Stale));
        }
    }

    private static void AddWarmingUpReasons(HealthInputs i, HealthOptions o, List<HealthReason> reasons)
    {
        var needed = i.IsDaily ? o.MinDailyPoints : o.MinHourlyPoints;
        if (i.ModelFittedAt is null && i.GridPoints < needed)
        {
            var unit = i.IsDaily ? "daily" : "hourly";
            reasons.Add(new(HealthReasonCode.InsufficientData,
                Format($"{i.GridPoints} of the {needed} {unit} grid points needed for a first fit are available."),
                HealthState.WarmingUp));
        }
    }

    private static void AddDriftReasons(HealthInputs i, HealthOptions o, List<HealthReason> reasons)
    {
        if (i.ModelFittedAt is null)
        {
            return;
        }

        if (i.ResidualPValue is { } p && !double.IsNaN(p) && p < o.ResidualPValueMin)
        {
            reasons.Add(new(HealthReasonCode.ResidualsNotWhite,
                Format($"The recent one-step residuals are not white (Ljung-Box p = {p:G3}, limit {o.ResidualPValueMin:G3}); the model no longer describes the series."),
                HealthState.Drifting));
        }

        if (i.ScoredDays < o.MinScoredDays)
        {
            return;
        }

        if (i.SkillVsPersistence is { } skill && !double.IsNaN(skill) && skill < o.MinSkillVsPersistence)
        {
            reasons.Add(new(HealthReasonCode.SkillBelowPersistence,
                Format($"Over the last {i.ScoredDays} scored days the forecasts did worse than persistence (skill {skill:F3}, limit {o.MinSkillVsPersistence:F3})."),
                HealthState.Drifting));
        }

        var off95 = i.Coverage95 is { } c95 && !double.IsNaN(c95) && Math.Abs(c95 - 0.95) > o.Coverage95Tolerance;
        var off80 = i.Coverage80 is { } c80 && !double.IsNaN(c80) && Math.Abs(c80 - 0.80) > o.Coverage80Tolerance;
        if (off95 || off80)
        {
            reasons.Add(new(HealthReasonCode.CoverageOff,
                Format($"Over the last {i.ScoredDays} scored days the intervals covered {i.Coverage80:P0} (80% nominal) and {i.Coverage95:P0} (95% nominal) of what happened."),
                HealthState.Drifting));
        }
    }

    private static string Describe(TimeSpan span) =>
        span.TotalHours < 48 ? Format($"{span.TotalHours:0.#}-hour") : Format($"{span.TotalDays:0.#}-day");

    private static string Format(FormattableString text) => text.ToString(CultureInfo.InvariantCulture);
}
