using MathNet.Numerics.Distributions;

namespace ForecastHub.Core.Forecasting;

/// <summary>Central Gaussian prediction intervals mean -+ z_{(1+level)/2} sd.</summary>
public static class GaussianInterval
{
    /// <summary>z_{(1+level)/2}; level must lie strictly between 0 and 1 (ArgumentOutOfRangeException otherwise, NaN included).</summary>
    public static double Multiplier(double level)
    {
        if (!(level > 0 && level < 1))
        {
            throw new ArgumentOutOfRangeException(nameof(level), level, "An interval level must lie strictly between 0 and 1.");
        }

        return Normal.InvCDF(0, 1, (1 + level) / 2);
    }

    public static PredictionInterval Of(double mean, double sd, double level)
    {
        var z = Multiplier(level);
        return new PredictionInterval(level, mean - z * sd, mean + z * sd);
    }

    /// <summary>Writes lower and upper bounds for every step with one multiplier; spans must have equal lengths.</summary>
    public static void Fill(ReadOnlySpan<double> mean, ReadOnlySpan<double> sd, double level, Span<double> lower, Span<double> upper)
    {
        if (sd.Length != mean.Length || lower.Length != mean.Length || upper.Length != mean.Length)
        {
            throw new ArgumentException("mean, sd, lower and upper must have the same length.", nameof(lower));
        }

        var z = Multiplier(level);
        for (var i = 0; i < mean.Length; i++)
        {
            lower[i] = mean[i] - z * sd[i];
            upper[i] = mean[i] + z * sd[i];
        }
    }
}
