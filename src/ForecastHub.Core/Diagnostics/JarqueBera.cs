using ForecastHub.Core.Series;
using MathNet.Numerics;

namespace ForecastHub.Core.Diagnostics;

/// <summary>
/// Jarque-Bera JB = n/6 (S^2 + (K - 3)^2 / 4) with moment skewness S and kurtosis K, chi-squared
/// with 2 df (Jarque and Bera 1980). Input rules: as <see cref="ResidualSummary"/>, and constant
/// residuals throw SeriesException(Constant).
/// </summary>
public static class JarqueBera
{
    public static JarqueBeraResult Test(IReadOnlyList<double[]> residuals) => Test(ResidualSummary.Of(residuals));

    /// <summary>From moments already computed (a fit reports them too, so the residuals are read once).</summary>
    internal static JarqueBeraResult Test(ResidualSummary moments)
    {
        if (moments.Sd == 0)
        {
            throw new SeriesException(SeriesProblem.Constant, "Constant residuals have no skewness or kurtosis.");
        }

        var excess = moments.Kurtosis - 3;
        var statistic = moments.Count / 6.0 * (moments.Skewness * moments.Skewness + excess * excess / 4);
        return new JarqueBeraResult(statistic, 2, SpecialFunctions.GammaUpperRegularized(1, statistic / 2), moments.Skewness, moments.Kurtosis);
    }

    public static JarqueBeraResult Test(double[] residuals) => Test([residuals]);
}
