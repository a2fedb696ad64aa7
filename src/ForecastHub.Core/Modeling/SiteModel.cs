using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Climatology;
using ForecastHub.Core.Correlation;
using ForecastHub.Core.Diagnostics;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Selection;

namespace ForecastHub.Core.Modeling;

/// <summary>What was fitted: the span, its grid points, how many were interpolated, and in how many segments.</summary>
public sealed record FitWindow(DateTimeOffset From, DateTimeOffset To, int Points, int Interpolated, int Segments);

/// <summary>
/// Seasonal innovation variance: Var(e_t) = sigma^2 g(t), g(t) = max(Floor, design(t) . Coefficients),
/// fitted by least squares of e_t^2 / mean(e^2) on the harmonics. A level-only design has
/// Coefficients [1], so g = 1 (the plain AR variance).
/// </summary>
public sealed record VarianceSeason(HarmonicDesign Design, IReadOnlyList<double> Coefficients, double Floor)
{
    public double[] Factors(IReadOnlyList<DateTimeOffset> times)
    {
        var g = Design.Evaluate(times, Coefficients);
        for (var i = 0; i < g.Length; i++)
        {
            g[i] = Math.Max(Floor, g[i]);
        }

        return g;
    }
}

/// <summary>
/// Calibration table: for horizon h (row h-1) the empirical quantiles, at <see cref="Probabilities"/>,
/// of standardised out-of-sample errors z = (observed - mean) / sd. Beyond the last row the last
/// row is used.
/// </summary>
public sealed record CalibrationTable(IReadOnlyList<double> Probabilities, IReadOnlyList<double[]> Quantiles, int Errors, int Origins, int Folds)
{
    /// <summary>The fit window the table was built from; a later fit may carry the table (see <see cref="Calibration.CanCarry"/>).
    /// Null in tables stored before this was recorded: those are never carried.</summary>
    public FitWindow? BuiltOn { get; init; }
}

/// <summary>Residual checks of the final AR fit; LjungBox is null when too few residuals exist for the lag count.</summary>
public sealed record ResidualDiagnostics(LjungBoxResult? LjungBox, JarqueBeraResult? JarqueBera, ResidualSummary Summary);

/// <summary>
/// Everything needed to forecast later from newer data. Plain records and lists, so it round-trips
/// through System.Text.Json (the service stores it as JSON). The anomaly a_t = y_t - climatology(t)
/// follows <see cref="Ar"/> with innovation variance Ar.InnovationVariance x VarianceSeason g(t).
/// </summary>
public sealed record SiteModel(
    GridCadence Cadence,
    string TimeZone,
    ModelSettings Settings,
    FitWindow Window,
    ClimatologyFit Climatology,
    ArModel Ar,
    OrderSelectionResult OrderSelection,
    VarianceSeason VarianceSeason,
    CalibrationTable? Calibration,
    ResidualDiagnostics Diagnostics,
    IReadOnlyList<LagValue> Acf,
    IReadOnlyList<string> Notes);
