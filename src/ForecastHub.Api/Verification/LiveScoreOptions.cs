namespace ForecastHub.Api.Verification;

/// <summary>Configuration section <c>LiveScores</c>: the recent window live skill and coverage are judged over.</summary>
public sealed class LiveScoreOptions
{
    public const string SectionName = "LiveScores";

    /// <summary>Days of scored forecasts that make the recent window.</summary>
    public int WindowDays { get; set; } = 14;

    /// <summary>A day counts as observed once this share of its grid points has a value.</summary>
    public double MinObservedShare { get; set; } = 0.75;

}
