using MathNet.Numerics.Distributions;

namespace ForecastHub.Core.Verification;

/// <summary>
/// Proper scores of one forecast against one outcome. NaN in gives NaN out (no exceptions), so a
/// caller can skip missing outcomes by checking the result.
/// </summary>
public static class Scores
{
    private static readonly double InvSqrtPi = 1 / Math.Sqrt(Math.PI);

    /// <summary>CRPS of N(mu, sigma^2) at y: sigma [z (2 Phi(z) - 1) + 2 phi(z) - 1/sqrt(pi)], z = (y - mu)/sigma
    /// (Gneiting and Raftery 2007, JASA 102, eq. 21). sigma 0 gives |y - mu|; negative sigma NaN.</summary>
    public static double CrpsGaussian(double mu, double sigma, double y)
    {
        if (sigma == 0)
        {
            return Math.Abs(y - mu);
        }

        if (!(sigma > 0))
        {
            return double.NaN;
        }

        var z = (y - mu) / sigma;
        return sigma * (z * (2 * Normal.CDF(0, 1, z) - 1) + 2 * Normal.PDF(0, 1, z) - InvSqrtPi);
    }

    /// <summary>Winkler (interval) score of a central (1 - alpha) interval: width plus 2/alpha times the miss
    /// (Gneiting and Raftery 2007, eq. 43).</summary>
    public static double Winkler(double lower, double upper, double level, double y)
    {
        var alpha = 1 - level;
        var score = upper - lower;
        if (y < lower)
        {
            score += 2 / alpha * (lower - y);
        }
        else if (y > upper)
        {
            score += 2 / alpha * (y - upper);
        }

        return score;
    }

    /// <summary>Pinball (quantile) loss of quantile q at probability tau.</summary>
    public static double Pinball(double q, double tau, double y) => y >= q ? tau * (y - q) : (1 - tau) * (q - y);
}
