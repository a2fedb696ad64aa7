namespace ForecastHub.Core.Quality;

/// <summary>A site's QC limits: readings outside <c>MinC..MaxC</c> are out of range; a jump larger
/// than <c>MaxStepCPerHour</c> per hour (at least one hour) away from both neighbours is a spike;
/// at least <see cref="FlatlineMinReadings"/> identical readings spanning at least
/// <c>FlatlineHours</c> are a flat line.</summary>
public sealed record QualityLimits(
    double MinC = QualityLimits.DefaultMinC,
    double MaxC = QualityLimits.DefaultMaxC,
    double MaxStepCPerHour = QualityLimits.DefaultMaxStepCPerHour,
    double FlatlineHours = QualityLimits.DefaultFlatlineHours)
{
    public const double DefaultMinC = -60;
    public const double DefaultMaxC = 60;
    public const double DefaultMaxStepCPerHour = 10;
    public const double DefaultFlatlineHours = 6;

    /// <summary>DESIGN section 3: a flat line needs at least six consecutive identical readings.</summary>
    public const int FlatlineMinReadings = 6;

    public static QualityLimits Default { get; } = new();
}
