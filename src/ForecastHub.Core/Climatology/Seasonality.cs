namespace ForecastHub.Core.Climatology;

/// <summary>Which seasonal cycles the climatology removes (DESIGN.md section 3).</summary>
public enum Seasonality
{
    /// <summary>Annual harmonics once a year of data exists, diurnal harmonics for hourly series, a plain level otherwise.</summary>
    Auto,

    /// <summary>A plain level: the sample mean (the model is then a demeaned AR(p), as R's ar).</summary>
    None,

    /// <summary>Level and annual harmonics.</summary>
    Annual,

    /// <summary>Level, annual and diurnal harmonics (hourly series only).</summary>
    AnnualDiurnal,
}
