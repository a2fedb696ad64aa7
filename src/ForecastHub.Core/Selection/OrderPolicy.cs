namespace ForecastHub.Core.Selection;

/// <summary>How the AR order is chosen.</summary>
public enum OrderPolicy
{
    /// <summary>The PACF proposes 0..P (P = last lag outside the band), the AIC decides among them.</summary>
    PacfAic,

    /// <summary>Smallest AIC over 0..maxOrder.</summary>
    Aic,

    /// <summary>Smallest AICc over 0..maxOrder.</summary>
    Aicc,

    /// <summary>Smallest BIC over 0..maxOrder.</summary>
    Bic,

    /// <summary>P itself: the last lag whose PACF lies outside the band.</summary>
    Pacf,
}
