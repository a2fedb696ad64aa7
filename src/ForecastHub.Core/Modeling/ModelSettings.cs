using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Climatology;
using ForecastHub.Core.Grid;
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

/// <summary>A site's model settings (DESIGN.md section 3); the defaults and ranges are the product's,
/// the one place they are written (the API, the command line and new sites read them here).</summary>
public sealed record ModelSettings
{
    public const int DefaultMaxOrder = 48;
    public const int MaxMaxOrder = 200;
    public const int DefaultFitWindowDaysHourly = 400;
    public const int DefaultFitWindowDaysDaily = 1461;
    public const int MinFitWindowDays = 7;
    public const int MaxFitWindowDays = 7305;

    public Seasonality Seasonality { get; init; } = Seasonality.Auto;

    public ArMethod Method { get; init; } = ArMethod.Burg;

    public OrderPolicy OrderPolicy { get; init; } = OrderPolicy.PacfAic;

    /// <summary>Upper limit on the AR order; the fit uses min(MaxOrder, floor(10 log10 n)).</summary>
    public int MaxOrder { get; init; } = DefaultMaxOrder;

    /// <summary>Only grid steps within this many days before the newest value are fitted (the
    /// hourly default; a daily site's default comes from <see cref="DefaultFor"/>).</summary>
    public int FitWindowDays { get; init; } = DefaultFitWindowDaysHourly;

    public IntervalMethod IntervalMethod { get; init; } = IntervalMethod.Calibrated;

    /// <summary>The settings of a new site of <paramref name="cadence"/>.</summary>
    public static ModelSettings DefaultFor(GridCadence cadence) => new()
    {
        FitWindowDays = cadence == GridCadence.Daily ? DefaultFitWindowDaysDaily : DefaultFitWindowDaysHourly,
    };

    internal void Validate()
    {
        ArgumentOutOfRangeException.ThrowIfNegative(MaxOrder, nameof(MaxOrder));
        ArgumentOutOfRangeException.ThrowIfLessThan(FitWindowDays, 1, nameof(FitWindowDays));
    }
}
