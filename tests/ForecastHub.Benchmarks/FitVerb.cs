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

        var model = SiteModelFitter.Fit(grid, Settings);
        output.WriteLine($"model: AR({model.Ar.Order}) by {model.Ar.Method}, {model.Climatology.Design.Columns} climatology terms ({model.Climatology.Estimation}), Ljung-Box Q {model.Diagnostics.LjungBox?.Statistic:F1} on {model.Diagnostics.LjungBox?.Lags} lags");
        var gaussian = Time(() => SiteModelFitter.Fit(grid, Settings), 7);
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"fit gaussian: median {gaussian:F1} ms over 7 fits"));
        var calibrated = Time(() => SiteModelFitter.Fit(grid, Settings with { IntervalMethod = IntervalMethod.Calibrated }), 3);
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"fit calibrated: median {calibrated:F1} ms over 3 fits"));
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"RESULT fit_ms={gaussian:F1}"));
        return 0;
    }

    private static double Time(Action action, int runs)
    {
        var times = new double[runs];
        for (var r = 0; r < runs; r++)
        {
            var start = Stopwatch.GetTimestamp();
            action();
            times[r] = Stopwatch.GetElapsedTime(start).TotalMilliseconds;
        }

        Array.Sort(times);
        return times[runs / 2];
    }
}
