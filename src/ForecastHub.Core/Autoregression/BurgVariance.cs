namespace ForecastHub.Core.Autoregression;

/// <summary>Which innovation variance Burg reports (R <c>ar.burg(var.method = )</c>).</summary>
public enum BurgVariance
{
    /// <summary>var.method = 1, R's default: v_p = v_{p-1} (1 - phi_pp^2), v_0 = mean square.</summary>
    Recursion = 1,

    /// <summary>var.method = 2: mean of the forward and backward squared prediction errors at order p.</summary>
    ErrorEnergy = 2,
}
