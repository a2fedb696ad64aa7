using System.Diagnostics;
using System.Globalization;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Selection;

namespace ForecastHub.Benchmarks;

/// <summary>
/// Whole site-model fit of 87,600 hourly points (10 years): harmonic climatology (annual 2 + diurnal 3,
/// QR), AR order selection up to 48 by AIC with Burg, GLS refit, seasonal variance, Ljung-Box and
/// Jarque-Bera. With FORECASTHUB_BENCH_CSV set, first writes the series there (epoch seconds, value)
/// so tests/benchmarks/fit-vs-r.sh can time R on the same data.
/// </summary>
internal sealed class FitVerb : IBenchmarkVerb
{
    public const int Hours = 87_600;

    private const int WarmupFits = 12;

    public string Name => "fit";

    public string Description => "whole fit of 87,600 hourly points (Gaussian intervals; calibrated reported too)";

    public static readonly ModelSettings Settings = new() { MaxOrder = 48, OrderPolicy = OrderPolicy.Aic, FitWindowDays = 3660, IntervalMethod = IntervalMethod.Gaussian };

    public int Run(TextWriter output)
    {
        var grid = Series.SeasonalHourlyGrid(Hours, seed: 2026);
        var csv = Environment.GetEnvironmentVariable("FORECASTHUB_BENCH_CSV");
        if (!string.IsNullOrEmpty(csv))
        {
            using var writer = new StreamWriter(csv);
            writer.WriteLine("epoch,value");
            for (var i = 0; i < grid.Count; i++)
            {
                writer.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{grid.Times[i].ToUnixTimeSeconds()},{grid.Values[i]:R}"));
            }
        }

        // Warm-up until the JIT has tiered up every stage (a method reaches tier 1 after 30 calls; a calibrated fit runs
        // the core fit 3 times), as in a service that refits its sites in one process; the pause lets the background JIT finish.
        var model = SiteModelFitter.Fit(grid, Settings);
        for (var i = 0; i < WarmupFits; i++)
        {
            SiteModelFitter.Fit(grid, Settings with { IntervalMethod = IntervalMethod.Calibrated });
        }

        Thread.Sleep(200);
        output.WriteLine($"model: AR({model.Ar.Order}) by {model.Ar.Method}, {model.Climatology.Design.Columns} climatology terms ({model.Climatology.Estimation}), Ljung-Box Q {model.Diagnostics.LjungBox?.Statistic:F1} on {model.Diagnostics.LjungBox?.Lags} lags");
        var (gaussian, gaussianCpu, gaussianP10) = Time(() => SiteModelFitter.Fit(grid, Settings), 15);
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"fit gaussian: median {gaussian:F1} ms wall (p10 {gaussianP10:F1}), {gaussianCpu:F1} ms CPU over 15 fits"));
        var (calibrated, calibratedCpu, calibratedP10) = Time(() => SiteModelFitter.Fit(grid, Settings with { IntervalMethod = IntervalMethod.Calibrated }), 5);
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"fit calibrated (default, 2 extra fold fits): median {calibrated:F1} ms wall (p10 {calibratedP10:F1}), {calibratedCpu:F1} ms CPU over 5 fits"));
        FitStages.Report(grid, output, 40);
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"RESULT fit_ms={gaussian:F1} fit_cpu_ms={gaussianCpu:F1} fit_p10_ms={gaussianP10:F1}"));
        return 0;
    }

    /// <summary>Median wall and process CPU time and 10th-percentile wall time (ms); CPU time is the fairer number on a shared, loaded machine.</summary>
    private static (double Wall, double Cpu, double WallP10) Time(Action action, int runs)
    {
        var wall = new double[runs];
        var cpu = new double[runs];
        using var process = Process.GetCurrentProcess();
        for (var r = 0; r < runs; r++)
        {
            process.Refresh();
            var cpuStart = process.TotalProcessorTime;
            var start = Stopwatch.GetTimestamp();
            action();
            wall[r] = Stopwatch.GetElapsedTime(start).TotalMilliseconds;
            process.Refresh();
            cpu[r] = (process.TotalProcessorTime - cpuStart).TotalMilliseconds;
        }

        Array.Sort(wall);
        Array.Sort(cpu);
        return (wall[runs / 2], cpu[runs / 2], wall[runs / 10]);
    }
}
