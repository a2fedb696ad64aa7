namespace ForecastHub.Core.Quality;

/// <summary>Quality-control flags of a reading (DESIGN section 3); flagged readings are stored and
/// shown but left out of fitting.</summary>
[Flags]
public enum QualityFlags
{
    None = 0,
    OutOfRange = 1,
    Spike = 2,
    FlatLine = 4,
}
