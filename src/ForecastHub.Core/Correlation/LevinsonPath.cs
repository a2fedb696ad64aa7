namespace ForecastHub.Core.Correlation;

/// <summary>All AR fits of orders 0..K from one recursion: coefficients, innovation variances, partial autocorrelations.</summary>
internal sealed class LevinsonPath
{
    public LevinsonPath(double[][] coefficients, double[] variances, double[] partials)
    {
        Coefficients = coefficients;
        Variances = variances;
        Partials = partials;
    }

    /// <summary>Coefficients[k] holds phi_{k,1..k}; Coefficients[0] is empty.</summary>
    public double[][] Coefficients { get; }

    /// <summary>Variances[k] is the order-k innovation variance v_k (v_0 = c_0).</summary>
    public double[] Variances { get; }

    /// <summary>Partials[k-1] is phi_kk, the lag-k partial autocorrelation.</summary>
    public double[] Partials { get; }

    public int MaxOrder => Partials.Length;
}
