using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Forecasting;

namespace ForecastHub.Core.Modeling;

/// <summary>h-step anomaly means and sds with a seasonal innovation variance.</summary>
internal static class AnomalyPath
{
    /// <summary>
    /// Means by the AR recursion (ArForecast); Var(h) = sigma^2 sum_{j&lt;h} psi_j^2 g(t_{h-j}), g the
    /// variance factor of each future step. With every g = 1 this is exactly R predict.ar's variance.
    /// </summary>
    public static void Compute(ArModel ar, ReadOnlySpan<double> history, ReadOnlySpan<double> psi, ReadOnlySpan<double> g, Span<double> mean, Span<double> sd)
    {
        ArForecast.Forecast(ar, history, mean, sd);
        var constant = true;
        for (var k = 0; k < mean.Length && constant; k++)
        {
            constant = g[k] == 1;
        }

        if (constant)
        {
            return;
        }

        for (var h = 1; h <= mean.Length; h++)
        {
            var sum = 0.0;
            for (var j = 0; j < h; j++)
            {
                sum += psi[j] * psi[j] * g[h - 1 - j];
            }

            sd[h - 1] = Math.Sqrt(ar.InnovationVariance * sum);
        }
    }

    /// <summary>The last p anomalies ending at <paramref name="last"/>; a missing or absent one is set to the AR mean
    /// (its expectation), so a short history never blocks a forecast.</summary>
    public static double[] History(ArModel ar, ReadOnlySpan<double> anomalies, int last)
    {
        var p = ar.Order;
        var history = new double[p];
        for (var i = 0; i < p; i++)
        {
            var t = last - p + 1 + i;
            history[i] = t >= 0 && double.IsFinite(anomalies[t]) ? anomalies[t] : ar.Mean;
        }

        return history;
    }
}
