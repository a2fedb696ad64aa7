namespace ForecastHub.Core.Correlation;

/// <summary>Durbin-Levinson recursion on autocovariances (R's eureka / uni_pacf).</summary>
internal static class DurbinLevinson
{
    /// <summary>Solves the Yule-Walker equations for orders 0..maxOrder; autocovariances[0..maxOrder] must be given and c_0 &gt; 0.</summary>
    public static LevinsonPath Run(ReadOnlySpan<double> autocovariances, int maxOrder)
    {
        var coefficients = new double[maxOrder + 1][];
        var variances = new double[maxOrder + 1];
        var partials = new double[maxOrder];
        coefficients[0] = [];
        variances[0] = autocovariances[0];
        for (var k = 1; k <= maxOrder; k++)
        {
            var previous = coefficients[k - 1];
            var numerator = autocovariances[k];
            for (var j = 1; j < k; j++)
            {
                numerator -= previous[j - 1] * autocovariances[k - j];
            }

            var phiKk = numerator / variances[k - 1];
            coefficients[k] = StepUp(previous, phiKk);
            partials[k - 1] = phiKk;
            variances[k] = variances[k - 1] * (1 - phiKk * phiKk);
        }

        return new LevinsonPath(coefficients, variances, partials);
    }

    /// <summary>Order-k coefficients from order k-1 and the partial autocorrelation r = phi_kk: phi_kj = phi_{k-1,j} - r phi_{k-1,k-j}.</summary>
    public static double[] StepUp(double[] previous, double r)
    {
        var k = previous.Length + 1;
        var current = new double[k];
        for (var j = 1; j < k; j++)
        {
            current[j - 1] = previous[j - 1] - r * previous[k - j - 1];
        }

        current[k - 1] = r;
        return current;
    }
}
