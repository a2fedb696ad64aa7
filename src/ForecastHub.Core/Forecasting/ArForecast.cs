using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Linear;
using ForecastHub.Core.Series;

namespace ForecastHub.Core.Forecasting;

/// <summary>
/// AR forecasts from the latest data (R predict.ar / predict.Arima): means by the AR recursion,
/// h-step variance sigma^2 sum_{j&lt;h} psi_j^2 with sigma^2 the model's InnovationVariance.
/// Input rules: null throws ArgumentNullException; steps &lt; 1 ArgumentOutOfRangeException; fewer
/// history points than the order SeriesException(TooShort); NaN or infinity among the last p points
/// SeriesException(NonFinite). Only the last p history points are read.
/// </summary>
public static class ArForecast
{
    private const int StackLimit = 256;

    /// <summary>psi_0..psi_{count-1} of the MA(infinity) form: psi_0 = 1, psi_j = sum_{i=1}^{min(j,p)} phi_i psi_{j-i}.</summary>
    public static double[] PsiWeights(IReadOnlyList<double> phi, int count)
    {
        ArgumentNullException.ThrowIfNull(phi);
        ArgumentOutOfRangeException.ThrowIfNegative(count);
        var psi = new double[count];
        Span<double> coefficients = phi.Count <= StackLimit ? stackalloc double[phi.Count] : new double[phi.Count];
        Copy(phi, coefficients);
        Span<double> reversed = phi.Count <= StackLimit ? stackalloc double[phi.Count] : new double[phi.Count];
        Reverse(coefficients, reversed);
        PsiWeights(reversed, psi);
        return psi;
    }

    public static ArForecastPath Forecast(ArModel model, IReadOnlyList<double> recentHistory, int steps)
    {
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(recentHistory);
        ArgumentOutOfRangeException.ThrowIfLessThan(steps, 1);
        var mean = new double[steps];
        var sd = new double[steps];
        var p = model.Order;
        var start = Math.Max(0, recentHistory.Count - p);
        Span<double> tail = p <= StackLimit ? stackalloc double[Math.Min(p, recentHistory.Count)] : new double[Math.Min(p, recentHistory.Count)];
        for (var i = 0; i < tail.Length; i++)
        {
            tail[i] = recentHistory[start + i];
        }

        Forecast(model, tail, mean, sd);
        return new ArForecastPath(mean, sd);
    }

    /// <summary>Allocation-free form: writes mean.Length steps into mean and sd (equal lengths, at least 1).</summary>
    public static void Forecast(ArModel model, ReadOnlySpan<double> recentHistory, Span<double> mean, Span<double> sd)
    {
        ArgumentNullException.ThrowIfNull(model);
        if (mean.Length < 1 || sd.Length != mean.Length)
        {
            throw new ArgumentOutOfRangeException(nameof(mean), "mean and sd must have the same length of at least 1.");
        }

        var p = model.Order;
        if (recentHistory.Length < p)
        {
            throw new SeriesException(SeriesProblem.TooShort, $"An AR({p}) forecast needs the last {p} points; {recentHistory.Length} were given.");
        }

        var steps = mean.Length;
        Span<double> phi = p <= StackLimit ? stackalloc double[p] : new double[p];
        Copy(model.Coefficients, phi);
        Span<double> reversed = p <= StackLimit ? stackalloc double[p] : new double[p];
        Reverse(phi, reversed);

        // x holds the last p deviations followed by the forecast deviations.
        Span<double> x = p + steps <= 2 * StackLimit ? stackalloc double[p + steps] : new double[p + steps];
        var history = recentHistory[^p..];
        for (var i = 0; i < p; i++)
        {
            if (!double.IsFinite(history[i]))
            {
                throw new SeriesException(SeriesProblem.NonFinite, $"History point {recentHistory.Length - p + i} is not finite.");
            }

            x[i] = history[i] - model.Mean;
        }

        for (var h = 0; h < steps; h++)
        {
            // sum_i phi_i x_{t-i} as a contiguous dot product of reversed phi with x[h .. h+p).
            var value = model.Intercept + SpanMath.Dot(reversed, x.Slice(h, p));
            x[p + h] = value;
            mean[h] = value + model.Mean;
        }

        // sd doubles as psi storage before the cumulative sum overwrites it.
        PsiWeights(reversed, sd);
        var cumulative = 0.0;
        for (var h = 0; h < steps; h++)
        {
            cumulative += sd[h] * sd[h];
            sd[h] = Math.Sqrt(model.InnovationVariance * cumulative);
        }
    }

    /// <summary>psi_j = sum_{i=1}^{min(j,p)} phi_i psi_{j-i}, as a dot product of the tail of reversed phi with psi[j-m .. j).</summary>
    private static void PsiWeights(ReadOnlySpan<double> reversedPhi, Span<double> psi)
    {
        var p = reversedPhi.Length;
        for (var j = 0; j < psi.Length; j++)
        {
            if (j == 0)
            {
                psi[0] = 1;
                continue;
            }

            var m = Math.Min(j, p);
            psi[j] = SpanMath.Dot(reversedPhi[(p - m)..], psi.Slice(j - m, m));
        }
    }

    private static void Reverse(ReadOnlySpan<double> source, Span<double> target)
    {
        for (var i = 0; i < source.Length; i++)
        {
            target[source.Length - 1 - i] = source[i];
        }
    }

    private static void Copy(IReadOnlyList<double> source, Span<double> target)
    {
        for (var i = 0; i < target.Length; i++)
        {
            target[i] = source[i];
        }
    }
}
