namespace ForecastHub.Core.Health;

/// <summary>One machine-readable reason (<see cref="Code"/>) with a sentence a person can act on, and the state it implies.</summary>
public sealed record HealthReason(string Code, string Message, string State);

/// <summary>Reason codes; stable, clients match on them.</summary>
public static class HealthReasonCode
{
    public const string InsufficientData = "insufficient-data";
    public const string NoRecentData = "no-recent-data";
    public const string ModelOutdated = "model-outdated";
    public const string FitFailed = "fit-failed";
    public const string ResidualsNotWhite = "residuals-not-white";
    public const string SkillBelowPersistence = "skill-below-persistence";
    public const string CoverageOff = "coverage-off";
    public const string FlatLine = "flat-line";
    public const string FlaggedShareHigh = "flagged-share-high";
}
