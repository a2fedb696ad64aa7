using System.Diagnostics;
using System.Globalization;
using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Climatology;
using ForecastHub.Core.Correlation;
using ForecastHub.Core.Diagnostics;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Selection;

namespace ForecastHub.Benchmarks;

/// <summary>
/// Per-stage wall times of the Gaussian site fit, replayed through the public entry points in the
/// order SiteModelFitter.FitCore runs them (gap-free grid, so one segment): where the fit's time goes.
/// </summary>
internal static class FitStages
{
    public static void Report(TimeGrid grid, TextWriter output, int runs)
    {
        var times = grid.Times.ToArray();
        var y = grid.Values.ToArray();
        var design = new HarmonicDesign(GridCadence.Hourly, grid.TimeZone, 2, 3);
        var variance = new HarmonicDesign(GridCadence.Hourly, grid.TimeZone, 2, 2);
        var stages = new List<(string Name, Func<object> Run)>();
        double[][] x = design.ColumnMajor(times);
        var ols = HarmonicRegression.Ols(x, y);
        var anomalies = Subtract(x, y, ols.Coefficients);
        var selection = OrderSelection.Select(anomalies, ArMethod.Burg, OrderPolicy.Aic, 48);
        var phi = selection.Model.Coefficients;
        var gls = HarmonicRegression.Gls(x, y, [(0, y.Length)], phi);
        var glsAnomalies = Subtract(x, y, gls.Coefficients);
        var ar = ArFit.Fit(glsAnomalies, selection.ChosenOrder, ArMethod.Burg);
        var residuals = ArFit.Residuals(ar, [glsAnomalies]);
        var squares = residuals[0].Select(e => e * e).ToArray();
        double[][] vColumns = [.. Enumerable.Range(0, 5).Concat(Enumerable.Range(5, 4)).Select(c => x[c][ar.Order..])];
        stages.Add(("whole SiteModelFitter.Fit", () => SiteModelFitter.Fit(grid, FitVerb.Settings)));
        stages.Add(("whole fit, calibrated", () => SiteModelFitter.Fit(grid, FitVerb.Settings with { IntervalMethod = IntervalMethod.Calibrated })));
        stages.Add(("design (11 columns)", () => design.ColumnMajor(times)));
        stages.Add(("OLS QR 87,600 x 11", () => HarmonicRegression.Ols(x, y)));
        stages.Add(("anomalies", () => Subtract(x, y, ols.Coefficients)));
        stages.Add(("order selection 0..48 (Burg, AIC)", () => OrderSelection.Select(anomalies, ArMethod.Burg, OrderPolicy.Aic, 48)));
        stages.Add(("  of which autocovariance to lag 48", () => Autocorrelation.Acf(anomalies, 48)));
        stages.Add(("  of which Burg fit of order 48", () => ArFit.Fit(anomalies, 48, ArMethod.Burg)));
        stages.Add(("GLS prewhiten + QR", () => HarmonicRegression.Gls(x, y, [(0, y.Length)], phi)));
        stages.Add(("AR re-estimate", () => ArFit.Fit(glsAnomalies, selection.ChosenOrder, ArMethod.Burg)));
        stages.Add(("one-step residuals", () => ArFit.Residuals(ar, [glsAnomalies])));
        stages.Add(("variance QR 87,600 x 9", () => HarmonicRegression.Ols(vColumns, squares)));
        stages.Add(("Ljung-Box + Jarque-Bera + summary", () => (LjungBox.Test(residuals, ar.Order + 24, ar.Order), JarqueBera.Test(residuals), ResidualSummary.Of(residuals))));
        stages.Add(("ACF to lag 48", () => Autocorrelation.Acf(glsAnomalies, 48)));
        output.WriteLine($"stages (mean thread CPU and wall of {runs} runs after warm-up; AR({selection.ChosenOrder})):");
        foreach (var (name, run) in stages)
        {
            var wall = new double[runs];
            var gen2 = GC.CollectionCount(2);
            var gen0 = GC.CollectionCount(0);
            var cpuStart = ThreadCpu.Milliseconds();
            for (var r = 0; r < runs; r++)
            {
                var start = Stopwatch.GetTimestamp();
                GC.KeepAlive(run());
                wall[r] = Stopwatch.GetElapsedTime(start).TotalMilliseconds;
            }

            // The thread clock ticks coarsely on some machines, so only its total over all runs is meaningful.
            var cpu = (ThreadCpu.Milliseconds() - cpuStart) / runs;
            Array.Sort(wall);
            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"  {name,-38} CPU {cpu,6:F2} ms, wall median {wall[runs / 2],6:F2} ms (min {wall[0]:F2}), GCs per run gen0 {(GC.CollectionCount(0) - gen0) / (double)runs:F1} gen2 {(GC.CollectionCount(2) - gen2) / (double)runs:F1}"));
        }
    }

    private static double[] Subtract(double[][] x, double[] y, double[] beta)
    {
        var r = (double[])y.Clone();
        for (var c = 0; c < beta.Length; c++)
        {
            for (var i = 0; i < r.Length; i++)
            {
                r[i] -= beta[c] * x[c][i];
            }
        }

        return r;
    }
}
