namespace ForecastHub.Core.Series;

/// <summary>Why a series was refused by a core entry point.</summary>
public enum SeriesProblem
{
    /// <summary>No points at all (no segments, or only empty segments).</summary>
    Empty,

    /// <summary>Fewer points (or, for lagged fits, fewer usable rows) than the requested order needs.</summary>
    TooShort,

    /// <summary>Every point has the same value, so the variance is zero and no correlation exists.</summary>
    Constant,

    /// <summary>A NaN or infinite value; the core never skips or imputes points itself.</summary>
    NonFinite,
}
