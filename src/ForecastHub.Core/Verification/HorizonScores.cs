namespace ForecastHub.Core.Verification;

/// <summary>Interval scores at one level: coverage share, mean width, mean Winkler score, and the mean
/// pinball loss of the two bounds as quantiles (1 - level)/2 and (1 + level)/2.</summary>
public sealed record IntervalScores(double Level, double Coverage, double MeanWidth, double Winkler, double Pinball);

/// <summary>
/// Scores at one horizon (steps ahead of the forecast origin). Bias = mean(forecast - observed).
/// Skill = 1 - MSE / MSE_ref against persistence (hourly: the same hour yesterday; daily:
/// yesterday's value) and against the climatology alone. Crps is the mean Gaussian CRPS.
/// </summary>
public sealed record HorizonScores(
    int Horizon,
    int Count,
    double Mae,
    double Rmse,
    double Bias,
    double PersistenceMae,
    double ClimatologyMae,
    double SkillVsPersistence,
    double SkillVsClimatology,
    double Crps,
    IReadOnlyList<IntervalScores> Intervals);
