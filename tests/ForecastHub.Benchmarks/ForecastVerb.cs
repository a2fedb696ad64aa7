using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Forecasting;

namespace ForecastHub.Benchmarks;

/// <summary>48-step forecast with 80% and 95% Gaussian intervals from a fitted model; target at most 20 us per forecast.</summary>
internal sealed class ForecastVerb : IBenchmarkVerb
{
    private const double TargetMicroseconds = 20;
    private const int Steps = 48;

    public string Name => "forecast";

    public string Description => "48-step AR forecast with 80% and 95% intervals (target <= 20 us)";

    public int Run(TextWriter output)
    {
        var met = true;
        foreach (var order in new[] { 3, 24, 48 })
        {
            var series = Series.Ar(20_000, order, seed: order);
            var model = ArFit.Fit(series, order, ArMethod.Burg);
            var history = series[^order..];
            var levels = new[] { 0.80, 0.95 };

            // The allocating API a caller uses: path record, then interval arrays per level.
            var allocating = Measure.Run(() =>
            {
                var path = ArForecast.Forecast(model, history, Steps);
                foreach (var level in levels)
                {
                    var lower = new double[Steps];
                    var upper = new double[Steps];
                    GaussianInterval.Fill(path.Mean, path.Sd, level, lower, upper);
                }
            });

            // The span API into caller-owned buffers.
            var mean = new double[Steps];
            var sd = new double[Steps];
            var bounds = new double[4 * Steps];
            var spans = Measure.Run(() =>
            {
                ArForecast.Forecast(model, history, mean, sd);
                GaussianInterval.Fill(mean, sd, 0.80, bounds.AsSpan(0, Steps), bounds.AsSpan(Steps, Steps));
                GaussianInterval.Fill(mean, sd, 0.95, bounds.AsSpan(2 * Steps, Steps), bounds.AsSpan(3 * Steps, Steps));
            });

            met &= allocating.MedianMicroseconds <= TargetMicroseconds && spans.MedianMicroseconds <= TargetMicroseconds;
            output.WriteLine($"forecast AR({order}), 48 steps, 2 levels, allocating API: {allocating.Describe()}");
            output.WriteLine($"forecast AR({order}), 48 steps, 2 levels, span API:       {spans.Describe()}");
        }

        output.WriteLine(met ? $"target met: every median <= {TargetMicroseconds} us" : $"TARGET MISSED: a median exceeds {TargetMicroseconds} us");
        return met ? 0 : 1;
    }
}
