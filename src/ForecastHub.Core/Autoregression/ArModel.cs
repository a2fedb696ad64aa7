namespace ForecastHub.Core.Autoregression;

/// <summary>
/// A fitted AR(p): x_t - Mean = Intercept + sum phi_i (x_{t-i} - Mean) + e_t, Var(e_t) = InnovationVariance.
/// InnovationVariance is the variance R reports for the method (see docs/numerics.md) and
/// is what forecasts use.
/// </summary>
public sealed record ArModel
{
    public required ArMethod Method { get; init; }

    public required int Order { get; init; }

    /// <summary>Level subtracted before the AR recursion: the common sample mean (R's x.mean) for Burg, Yule-Walker and least squares; the estimated mean (R arima's intercept) for maximum likelihood.</summary>
    public required double Mean { get; init; }

    /// <summary>Least squares only (R ar.ols x.intercept): x_t - Mean = Intercept + sum phi_i (x_{t-i} - Mean) + e_t; 0 for other methods.</summary>
    public double Intercept { get; init; }

    /// <summary>phi_1..phi_p.</summary>
    public required IReadOnlyList<double> Coefficients { get; init; }

    /// <summary>Standard error of each phi_i (see docs/numerics.md for the formula per method).</summary>
    public required IReadOnlyList<double> StandardErrors { get; init; }

    public required double InnovationVariance { get; init; }

    /// <summary>Burg only: which variance convention InnovationVariance follows.</summary>
    public BurgVariance? BurgVariance { get; init; }

    /// <summary>Total number of points over all segments (R's n.used).</summary>
    public required int SampleSize { get; init; }

    public required int SegmentCount { get; init; }

    /// <summary>Roots of 1 - sum phi_i z^i, smallest modulus first.</summary>
    public required IReadOnlyList<CharacteristicRoot> Roots { get; init; }

    public required StationarityStatus Stationarity { get; init; }

    public bool Stationary => Stationarity != StationarityStatus.NonStationary;

    /// <summary>Exact Gaussian log-likelihood (maximum likelihood only; R arima's loglik).</summary>
    public double? LogLikelihood { get; init; }

    internal static ArModel Create(
        ArMethod method,
        Series.SegmentSummary summary,
        double mean,
        double[] coefficients,
        double[] standardErrors,
        double innovationVariance)
    {
        var roots = CharacteristicRoots.Of(coefficients);
        return new ArModel
        {
            Method = method,
            Order = coefficients.Length,
            Mean = mean,
            Coefficients = coefficients,
            StandardErrors = standardErrors,
            InnovationVariance = innovationVariance,
            SampleSize = summary.Count,
            SegmentCount = summary.Segments.Count,
            Roots = roots,
            Stationarity = CharacteristicRoots.Classify(roots),
        };
    }
}
