using System.Globalization;
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

    /// <summary>A local clock time as sites write it ("HH:mm", 00:00 to 23:59, two digits each).</summary>
    public static string ClockTime(TimeOnly time) => time.ToString("HH:mm", CultureInfo.InvariantCulture);

    /// <summary>The time of a "HH:mm" clock text (two digits each); false for anything else.</summary>
    public static bool TryParseClockTime(string? text, out TimeOnly time)
    {
        time = default;
        return text is { Length: 5 } && char.IsAsciiDigit(text[0]) && char.IsAsciiDigit(text[1]) && text[2] == ':'
            && char.IsAsciiDigit(text[3]) && char.IsAsciiDigit(text[4])
            && TimeOnly.TryParseExact(text, "HH:mm", CultureInfo.InvariantCulture, DateTimeStyles.None, out time);
    }

    /// <summary>The time of a stored "HH:mm" clock text; anything else is a corrupt record.</summary>
    public static TimeOnly ParseClockTime(string text) => TryParseClockTime(text, out var time)
        ? time
        : throw new FormatException($"'{text}' is not a clock time HH:mm.");
}
