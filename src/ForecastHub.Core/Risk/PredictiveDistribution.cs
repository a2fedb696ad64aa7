using ForecastHub.Core.Modeling;
using MathNet.Numerics.Distributions;

namespace ForecastHub.Core.Risk;

/// <summary>
/// One step's predictive distribution, the one its intervals come from: Y = mean + sd Q(Z) with Z
/// standard normal, Q the identity (gaussian) or the calibration row's quantile function of the
/// standardised error (calibrated). Probabilities are therefore exactly consistent with the intervals:
/// with a gaussian model P(Y &lt; c) is the Gaussian CDF (R pnorm(c, mean, sd)).
/// </summary>
public readonly record struct PredictiveDistribution(double Mean, double Sd, double[]? Row)
{
    /// <summary>The distribution of a step <paramref name="horizon"/> steps after the newest value; gaussian when <paramref name="table"/> is null.</summary>
    public static PredictiveDistribution Of(double mean, double sd, CalibrationTable? table, int horizon) =>
        new(mean, sd, table is null ? null : Calibration.Row(table, horizon));

    /// <summary>The value at normal score z.</summary>
    public double ValueAtScore(double z) => Mean + Sd * (Row is null ? z : Calibration.QuantileAtScore(Row, z));

    /// <summary>The normal score z at which the value reaches c, so P(Y &lt; c) = Phi(z).</summary>
    public double ScoreOf(double c)
    {
        if (!(Sd > 0))
        {
            return c > Mean ? double.PositiveInfinity : double.NegativeInfinity;
        }

        var x = (c - Mean) / Sd;
        return Row is null ? x : Calibration.ScoreOf(Row, x);
    }

    /// <summary>P(Y &lt; c) for a below threshold, P(Y &gt; c) for an above one.</summary>
    public double Probability(ThresholdDirection direction, double c)
    {
        var below = Normal.CDF(0, 1, ScoreOf(c));
        return direction == ThresholdDirection.Below ? below : 1 - below;
    }
}
