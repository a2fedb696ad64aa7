using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Climatology;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Selection;

namespace ForecastHub.Core.Settings;

/// <summary>
/// The words of DESIGN section 3 for each site setting: the one table the HTTP API, the command
/// line, the OpenAPI document and storage read. Settings are parsed once at the edge into the
/// typed values and turned back into these words only for answers and storage.
/// </summary>
public static class WireNames
{
    public static readonly WordTable<GridCadence> Cadences = new(
        (GridCadence.Hourly, "hourly"),
        (GridCadence.Daily, "daily"));

    public static readonly WordTable<DailyStatistic> DailyStatistics = new(
        (DailyStatistic.Mean, "mean"),
        (DailyStatistic.Min, "min"),
        (DailyStatistic.Max, "max"));

    public static readonly WordTable<Seasonality> Seasonalities = new(
        (Seasonality.Auto, "auto"),
        (Seasonality.None, "none"),
        (Seasonality.Annual, "annual"),
        (Seasonality.AnnualDiurnal, "annual-diurnal"));

    public static readonly WordTable<ArMethod> Methods = new(
        (ArMethod.Burg, "burg"),
        (ArMethod.YuleWalker, "yule-walker"),
        (ArMethod.LeastSquares, "least-squares"),
        (ArMethod.MaxLikelihood, "max-likelihood"));

    public static readonly WordTable<OrderPolicy> OrderPolicies = new(
        (OrderPolicy.PacfAic, "pacf-aic"),
        (OrderPolicy.Aic, "aic"),
        (OrderPolicy.Aicc, "aicc"),
        (OrderPolicy.Bic, "bic"),
        (OrderPolicy.Pacf, "pacf"));

    public static readonly WordTable<IntervalMethod> IntervalMethods = new(
        (IntervalMethod.Calibrated, "calibrated"),
        (IntervalMethod.Gaussian, "gaussian"));

    public static readonly WordTable<ThresholdDirection> ThresholdDirections = new(
        (ThresholdDirection.Below, "below"),
        (ThresholdDirection.Above, "above"));
}
