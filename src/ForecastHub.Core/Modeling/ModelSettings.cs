using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Climatology;
using ForecastHub.Core.Selection;

namespace ForecastHub.Core.Modeling;

/// <summary>How prediction intervals are formed.</summary>
public enum IntervalMethod
{
    /// <summary>Empirical quantiles of standardised out-of-sample errors per horizon (rolling origin).</summary>
    Calibrated,

    /// <summary>mean -+ z sd from the psi-weight variance (R predict.ar).</summary>
    Gaussian,
}

/// <summary>A site's model settings (DESIGN.md section 3); the defaults are the product defaults.</summary>
public sealed record ModelSettings
{
    public Seasonality Seasonality { get; init; } = Seasonality.Auto;

    public ArMethod Method { get; init; } = ArMethod.Burg;

    public OrderPolicy OrderPolicy { get; init; } = OrderPolicy.PacfAic;

    /// <summary>Upper limit on the AR order; the fit uses min(MaxOrder, floor(10 log10 n)).</summary>
    public int MaxOrder { get; init; } = 48;

    /// <summary>Only grid steps within this many days before the newest value are fitted.</summary>
    public int FitWindowDays { get; init; } = 1095;

    public IntervalMethod IntervalMethod { get; init; } = IntervalMethod.Calibrated;

    internal void Validate()
    {
        ArgumentOutOfRangeException.ThrowIfNegative(MaxOrder, nameof(MaxOrder));
        ArgumentOutOfRangeException.ThrowIfLessThan(FitWindowDays, 1, nameof(FitWindowDays));
    }
}
