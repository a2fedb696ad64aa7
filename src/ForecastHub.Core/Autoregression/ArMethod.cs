namespace ForecastHub.Core.Autoregression;

/// <summary>AR estimator, each following the matching R function.</summary>
public enum ArMethod
{
    /// <summary>Burg's lattice recursion (R <c>ar.burg</c>).</summary>
    Burg,

    /// <summary>Yule-Walker equations on the sample autocovariances (R <c>ar.yw</c>).</summary>
    YuleWalker,

    /// <summary>Ordinary least squares with an intercept on the demeaned series (R <c>ar.ols</c>).</summary>
    LeastSquares,

    /// <summary>Exact Gaussian maximum likelihood (R <c>arima(order = c(p, 0, 0), method = "ML")</c>).</summary>
    MaxLikelihood,
}
