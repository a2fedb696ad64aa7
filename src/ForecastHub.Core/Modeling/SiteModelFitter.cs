using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Climatology;
using ForecastHub.Core.Correlation;
using ForecastHub.Core.Diagnostics;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Linear;
using ForecastHub.Core.Selection;
using ForecastHub.Core.Series;

namespace ForecastHub.Core.Modeling;

/// <summary>
/// Fits a site model from its grid: climatology (harmonic regression), AR order selection and
/// estimation on the anomalies, GLS refit of the harmonics with the AR errors, seasonal innovation
/// variance, diagnostics and (by default) the interval calibration table. docs/numerics.md.
/// Input rules: null throws ArgumentNullException; bad settings ArgumentOutOfRangeException; a grid
/// with no steps or no values SeriesException(Empty); fewer than <see cref="MinimumPoints"/> points in
/// the window SeriesException(TooShort); a constant window SeriesException(Constant); an infinite
/// value SeriesException(NonFinite). Missing grid steps (NaN) are gaps, never errors.
/// </summary>
public static class SiteModelFitter
{
    public const int MinimumPoints = 10;

    public static SiteModel Fit(TimeGrid grid, ModelSettings settings) => Fit(grid, settings, previous: null, TimeSpan.Zero);

    /// <summary>As <see cref="Fit(TimeGrid, ModelSettings)"/>, but keeps <paramref name="previous"/>'s calibration table instead
    /// of building one when <see cref="Calibration.CanCarry"/> allows it for <paramref name="carryLimit"/>: a refit then costs one fit, not three.</summary>
    public static SiteModel Fit(TimeGrid grid, ModelSettings settings, SiteModel? previous, TimeSpan carryLimit)
    {
        ArgumentNullException.ThrowIfNull(grid);
        ArgumentNullException.ThrowIfNull(settings);
        settings.Validate();
        if (grid.Count == 0)
        {
            throw new SeriesException(SeriesProblem.Empty, "The grid has no steps.");
        }

        if (grid.LastValueIndex < 0)
        {
            throw new SeriesException(SeriesProblem.Empty, "Every grid step is missing.");
        }

        var window = SeriesWindow.FromGrid(grid, settings.FitWindowDays);
        double[][]? x = null;
        try
        {
            var notes = new List<string>();
            var design = ResolveDesign(window, grid.Cadence, grid.TimeZone, settings.Seasonality, notes);
            x = design.Columns == 1 ? null : PooledDesign.Rent(design, window.Times);
            if (previous?.Calibration is { } table && Calibration.CanCarry(previous, window.Times[^1], window.Count, design, settings, carryLimit))
            {
                var model = FitCore(window, settings, design, x, notes, diagnostics: true);
                return model with { Calibration = table, Notes = [.. model.Notes, Calibration.CarriedNote(table, carryLimit)] };
            }

            return FitWithDesign(window, settings, design, x, notes);
        }
        finally
        {
            if (x is not null)
            {
                PooledDesign.Return(x);
            }

            window.ReturnPooled();
        }
    }

    internal static SiteModel FitWithDesign(SeriesWindow window, ModelSettings settings, HarmonicDesign design, double[][]? x, List<string> notes)
    {
        if (settings.IntervalMethod != IntervalMethod.Calibrated)
        {
            return FitCore(window, settings, design, x, notes, diagnostics: true);
        }

        // The calibration's fold fits need only the design, not the model: they run beside the main fit.
        SiteModel? model = null;
        CalibrationTable? table = null;
        var calibrationNotes = new List<string>();
        SideBySide.Run(
            () => model = FitCore(window, settings, design, x, notes, diagnostics: true),
            () => table = Calibration.Build(window, design, settings, x, calibrationNotes));

        return model! with { Calibration = table is null ? null : table with { BuiltOn = model.Window }, Notes = [.. model.Notes, .. calibrationNotes] };
    }

    /// <summary>Annual terms need a year of data; diurnal terms an hourly grid (DESIGN.md section 3).</summary>
    internal static HarmonicDesign ResolveDesign(SeriesWindow window, GridCadence cadence, string timeZone, Seasonality seasonality, List<string> notes)
    {
        var yearOfData = window.Count > 0 && (window.Times[^1] - window.Times[0]).TotalDays >= 365;
        var hourly = cadence == GridCadence.Hourly;
        var (annual, diurnal) = seasonality switch
        {
            Seasonality.None => (0, 0),
            Seasonality.Annual => (2, 0),
            Seasonality.AnnualDiurnal => (2, hourly ? 3 : 0),
            _ => (yearOfData ? 2 : 0, hourly ? 3 : 0),
        };
        if (annual > 0 && !yearOfData)
        {
            notes.Add("Annual harmonics need a year of data; fitted without them.");
            annual = 0;
        }

        if (seasonality == Seasonality.AnnualDiurnal && !hourly)
        {
            notes.Add("Diurnal harmonics apply to hourly sites only; fitted without them.");
        }

        return new HarmonicDesign(cadence, timeZone, annual, diurnal);
    }

    /// <param name="x">The design columns at the window's times (null for a level-only design), read in their first
    /// <c>window.Count</c> rows only: pooled columns run longer, and a fold's fit is given the whole window's.</param>
    internal static SiteModel FitCore(SeriesWindow window, ModelSettings settings, HarmonicDesign design, double[][]? x, List<string> notes, bool diagnostics)
    {
        var cadence = design.Cadence;
        var n = window.Count;
        if (n < Math.Max(MinimumPoints, design.Columns + 2))
        {
            throw new SeriesException(SeriesProblem.TooShort, $"{n} grid points are too few to fit a model (at least {Math.Max(MinimumPoints, design.Columns + 2)} needed).");
        }

        var y = window.Values;
        var constant = true;
        for (var i = 0; i < n; i++)
        {
            if (!double.IsFinite(y[i]))
            {
                throw new SeriesException(SeriesProblem.NonFinite, $"Grid value at {window.Times[i]:O} is not finite.");
            }

            constant &= y[i] == y[0];
        }

        if (constant)
        {
            throw new SeriesException(SeriesProblem.Constant, "Every grid value is the same; no anomaly model can be fitted.");
        }

        var levelOnly = design.Columns == 1;
        double[] coefficients;
        double[] stdErrors;
        double residualSd;
        string estimation;
        OrderSelectionResult selection;
        ArModel ar;
        double[] anomalies;
        if (levelOnly)
        {
            // Seasonality none: the sample mean, so the AR part equals R's ar on the raw series.
            var mean = y.Average();
            coefficients = [mean];
            anomalies = y.Select(v => v - mean).ToArray();
            selection = Select(window, anomalies, settings);
            ar = selection.Model;
            var phiSum = selection.Model.Coefficients.Sum();
            stdErrors = [Math.Sqrt(selection.Model.InnovationVariance / n) / Math.Abs(1 - phiSum)];
            residualSd = Math.Sqrt(anomalies.Sum(a => a * a) / (n - 1));
            estimation = "mean";
        }
        else
        {
            var ols = HarmonicRegression.OlsOnLeadingRows(x!, y);
            anomalies = Residuals(x!, y, ols.Coefficients);
            selection = Select(window, anomalies, settings);
            ar = selection.Model;
            (coefficients, stdErrors, residualSd, estimation) = (ols.Coefficients, ols.StdErrors, ols.Sigma, "ols");
            if (selection.ChosenOrder > 0)
            {
                // The order is chosen on the OLS anomalies; the AR is then re-estimated at that order on the GLS anomalies.
                var gls = HarmonicRegression.GlsOnLeadingRows(x!, y, window.Segments, selection.Model.Coefficients);
                // The OLS anomalies are not read again once the order is chosen: their array takes the GLS ones.
                anomalies = Residuals(x!, y, gls.Coefficients, into: anomalies);
                ar = ArFit.Fit(window.Split(anomalies), selection.ChosenOrder, settings.Method);
                (coefficients, stdErrors, estimation) = (gls.Coefficients, gls.StdErrors, "gls");
                residualSd = Math.Sqrt(SumOfSquares(anomalies) / (n - design.Columns));
            }
        }

        var names = design.TermNames();
        var climatology = new ClimatologyFit(
            settings.Seasonality,
            design,
            names.Select((name, i) => new HarmonicTerm(name, coefficients[i], stdErrors[i])).ToArray(),
            estimation,
            residualSd,
            n);
        var anomalySegments = window.Split(anomalies);
        var residuals = ArFit.Residuals(ar, anomalySegments);
        VarianceSeason? varianceSeason = null;
        ResidualDiagnostics? residualDiagnostics = null;
        LagValue[] acf = [];
        var acfLags = Math.Min(Math.Max(selection.MaxOrder, 1), n - 1);
        // The variance season, the anomalies' ACF and the residual diagnostics need nothing of each other: side by side.
        SideBySide.Run(
            () =>
            {
                varianceSeason = FitVarianceSeason(window, residuals, ar.Order, design, x);
                acf = diagnostics ? [.. Autocorrelation.Acf(anomalySegments, acfLags).Skip(1).Select((r, k) => new LagValue(k + 1, r))] : [];
            },
            () => residualDiagnostics = diagnostics ? Diagnose(residuals, ar.Order, cadence) : new ResidualDiagnostics(null, null, ResidualSummary.Of(residuals)));
        var fitWindow = new FitWindow(window.Times[0], window.Times[^1], n, window.Interpolated.AsSpan().Count(true), window.Segments.Length);
        return new SiteModel(cadence, design.TimeZone, settings, fitWindow, climatology, ar, selection, varianceSeason!, null, residualDiagnostics!, acf, [.. notes]);
    }

    private static OrderSelectionResult Select(SeriesWindow window, double[] anomalies, ModelSettings settings) =>
        OrderSelection.Select(window.Split(anomalies), settings.Method, settings.OrderPolicy, settings.MaxOrder);

    /// <summary>sum a_i^2 in index order (as Enumerable.Sum would add them).</summary>
    private static double SumOfSquares(double[] a)
    {
        var sum = 0.0;
        foreach (var v in a)
        {
            sum += v * v;
        }

        return sum;
    }

    private static double[] Residuals(double[][] x, double[] y, double[] beta, double[]? into = null)
    {
        var r = into ?? new double[y.Length];
        y.CopyTo(r, 0);
        SpanMath.AddCombination([.. beta.Select(b => -b)], x, 0, r);
        return r;
    }

    /// <summary>Harmonics (at most 2 annual, 2 diurnal) on the squared one-step residuals; see <see cref="VarianceSeason"/>.
    /// Its design columns are a subset of the climatology's, so their rows are copied from <paramref name="x"/>
    /// straight into the QR's blocks.</summary>
    private static VarianceSeason FitVarianceSeason(SeriesWindow window, IReadOnlyList<double[]> residuals, int order, HarmonicDesign design, double[][]? x)
    {
        var vDesign = design with { AnnualHarmonics = Math.Min(design.AnnualHarmonics, 2), DiurnalHarmonics = Math.Min(design.DiurnalHarmonics, 2) };
        const double floor = 0.2;
        var count = 0;
        var sumSquares = 0.0;
        foreach (var segment in residuals)
        {
            count += segment.Length;
            sumSquares += SpanMath.Dot(segment, segment);
        }

        var meanSquare = count > 0 ? sumSquares / count : 0;
        if (x is null || vDesign.Columns == 1 || !(meanSquare > 0) || count < 10 * vDesign.Columns)
        {
            return new VarianceSeason(vDesign with { AnnualHarmonics = 0, DiurnalHarmonics = 0 }, [1.0], floor);
        }

        var source = VarianceColumns(design, vDesign);
        var k = source.Length;
        var qr = new TallSkinnyQr(k + 1);
        for (var s = 0; s < window.Segments.Length; s++)
        {
            var e = residuals[s];
            var first = window.Segments[s].Start + order;
            for (var i = 0; i < e.Length; i += TallSkinnyQr.BlockRows)
            {
                var rows = Math.Min(TallSkinnyQr.BlockRows, e.Length - i);
                for (var c = 0; c < k; c++)
                {
                    x[source[c]].AsSpan(first + i, rows).CopyTo(qr.Block(c));
                }

                var target = qr.Block(k);
                for (var r = 0; r < rows; r++)
                {
                    target[r] = e[i + r] * e[i + r] / meanSquare;
                }

                qr.Commit(rows);
            }
        }

        return new VarianceSeason(vDesign, HarmonicRegression.Solve(qr).Coefficients, floor);
    }

    /// <summary>Indices of the variance design's columns (level, its annual and diurnal terms) among the climatology's.</summary>
    internal static int[] VarianceColumns(HarmonicDesign climatology, HarmonicDesign variance) =>
        [.. Enumerable.Range(0, 1 + (2 * variance.AnnualHarmonics)).Concat(Enumerable.Range(1 + (2 * climatology.AnnualHarmonics), 2 * variance.DiurnalHarmonics))];

    /// <summary>Ljung-Box on p + 24 lags (hourly) or p + 10 (daily), df = lags - p (common practice, no source).</summary>
    private static ResidualDiagnostics Diagnose(IReadOnlyList<double[]> residuals, int order, GridCadence cadence)
    {
        var summary = ResidualSummary.Of(residuals);
        var lags = order + (cadence == GridCadence.Hourly ? 24 : 10);
        var ljungBox = summary.Count > lags + 1 && summary.Sd > 0 ? LjungBox.Test(residuals, lags, order) : null;
        var jarqueBera = summary.Sd > 0 ? JarqueBera.Test(summary) : null;
        return new ResidualDiagnostics(ljungBox, jarqueBera, summary);
    }
}
