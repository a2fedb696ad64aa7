namespace ForecastHub.Core.Quality;

/// <summary>One reading as the QC checks see it: its instant and its value in degrees C.</summary>
public readonly record struct QualityPoint(DateTimeOffset Time, double ValueC);
