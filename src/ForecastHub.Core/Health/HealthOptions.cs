namespace ForecastHub.Core.Health;

/// <summary>
/// Thresholds of the model-health rules. Defaults follow DESIGN section 6 where it names one;
/// the drift thresholds are common practice, no source.
/// </summary>
public sealed record HealthOptions
{
    /// <summary>Below this many hourly grid points (7 days) a site is warming up.</summary>
    public int MinHourlyPoints { get; init; } = 7 * 24;

    /// <summary>Below this many daily grid points a site is warming up.</summary>
    public int MinDailyPoints { get; init; } = 60;

    /// <summary>An hourly site whose newest reading is older than this is stale.</summary>
    public TimeSpan HourlyDataMaxAge { get; init; } = TimeSpan.FromHours(6);

    /// <summary>A daily site whose newest reading is older than this is stale.</summary>
    public TimeSpan DailyDataMaxAge { get; init; } = TimeSpan.FromDays(2);

    /// <summary>A model older than this while newer data exists is stale.</summary>
    public TimeSpan ModelMaxAge { get; init; } = TimeSpan.FromDays(7);

    /// <summary>Residuals whose Ljung-Box p-value is below this are no longer white (common practice, no source).</summary>
    public double ResidualPValueMin { get; init; } = 0.01;

    /// <summary>Live skill against persistence below this (over the recent window) means drifting.</summary>
    public double MinSkillVsPersistence { get; init; }

    /// <summary>Live scores are judged only once at least this many days have been scored (common practice, no source).</summary>
    public int MinScoredDays { get; init; } = 7;

    /// <summary>How far the live 95% coverage may stray from 0.95 before the intervals count as off (common practice, no source).</summary>
    public double Coverage95Tolerance { get; init; } = 0.10;

    /// <summary>How far the live 80% coverage may stray from 0.80 before the intervals count as off (common practice, no source).</summary>
    public double Coverage80Tolerance { get; init; } = 0.15;

    /// <summary>More than this share of the last day's readings flagged means the sensor is suspect.</summary>
    public double MaxFlaggedShare { get; init; } = 0.05;

    /// <summary>Throws when a threshold is outside its meaningful range, naming it; options are validated at start.</summary>
    public void Validate()
    {
        Require(MinHourlyPoints >= 2, nameof(MinHourlyPoints), "at least 2");
        Require(MinDailyPoints >= 2, nameof(MinDailyPoints), "at least 2");
        Require(HourlyDataMaxAge > TimeSpan.Zero, nameof(HourlyDataMaxAge), "positive");
        Require(DailyDataMaxAge > TimeSpan.Zero, nameof(DailyDataMaxAge), "positive");
        Require(ModelMaxAge > TimeSpan.Zero, nameof(ModelMaxAge), "positive");
        Require(ResidualPValueMin is >= 0 and < 1, nameof(ResidualPValueMin), "in [0, 1)");
        Require(double.IsFinite(MinSkillVsPersistence), nameof(MinSkillVsPersistence), "finite");
        Require(MinScoredDays >= 1, nameof(MinScoredDays), "at least 1");
        Require(Coverage95Tolerance is > 0 and < 1, nameof(Coverage95Tolerance), "in (0, 1)");
        Require(Coverage80Tolerance is > 0 and < 1, nameof(Coverage80Tolerance), "in (0, 1)");
        Require(MaxFlaggedShare is >= 0 and < 1, nameof(MaxFlaggedShare), "in [0, 1)");
    }

    private static void Require(bool ok, string name, string what)
    {
        if (!ok)
        {
            throw new ArgumentException($"Health option {name} must be {what}.", name);
        }
    }
}
