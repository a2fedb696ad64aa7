namespace ForecastHub.Core.Health;

/// <summary>
/// What the health rules look at for one site, gathered by the caller at <see cref="Now"/>.
/// Null or NaN numbers mean "not known yet" and are not judged.
/// </summary>
public sealed record HealthInputs
{
    public required DateTimeOffset Now { get; init; }

    /// <summary>True for a daily site, false for an hourly one.</summary>
    public bool IsDaily { get; init; }

    /// <summary>Valid (fit-usable) grid points the site has.</summary>
    public int GridPoints { get; init; }

    public DateTimeOffset? LastObservationAt { get; init; }

    public DateTimeOffset? ModelFittedAt { get; init; }

    /// <summary>Set when a stored model exists but serves nothing (a format this build does not read): the sentence saying so; a refit is due.</summary>
    public string? UnservableModel { get; init; }

    /// <summary>Time of the newest grid point the serving model was fitted on.</summary>
    public DateTimeOffset? ModelDataEnd { get; init; }

    /// <summary>When the most recent fit attempt failed, if it did after the serving model was fitted.</summary>
    public DateTimeOffset? LastFitFailedAt { get; init; }

    public string? LastFitError { get; init; }

    /// <summary>Ljung-Box p-value of the model's recent one-step residuals.</summary>
    public double? ResidualPValue { get; init; }

    /// <summary>Days of archived forecasts scored in the recent window.</summary>
    public int ScoredDays { get; init; }

    /// <summary>Live skill against persistence over the recent window, 1 - MSE_model / MSE_persistence.</summary>
    public double? SkillVsPersistence { get; init; }

    public double? Coverage80 { get; init; }

    public double? Coverage95 { get; init; }

    /// <summary>True when the newest readings form a flat line (QC flag on the newest reading).</summary>
    public bool NewestReadingsFlatLine { get; init; }

    /// <summary>Readings stored in the last day, flagged ones included.</summary>
    public int LastDayReadings { get; init; }

    public int LastDayFlagged { get; init; }
}

/// <summary>The outcome: the most urgent state and every reason that applies, most urgent first.</summary>
public sealed record HealthAssessment(
    string State,
    IReadOnlyList<HealthReason> Reasons,
    DateTimeOffset? LastObservationAt,
    DateTimeOffset? ModelFittedAt);
