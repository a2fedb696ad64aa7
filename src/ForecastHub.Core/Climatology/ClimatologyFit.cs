namespace ForecastHub.Core.Climatology;

/// <summary>One regression term with its standard error.</summary>
public sealed record HarmonicTerm(string Name, double Coefficient, double StdError);

/// <summary>
/// A fitted climatology: the seasonal mean mu(t) = sum of Terms over Design. Estimation says how:
/// "mean" (seasonality none: the sample mean, R ar's x.mean), "ols" (no AR errors), or "gls"
/// (pre-whitened by the final AR filter; standard errors from that regression).
/// </summary>
public sealed record ClimatologyFit(
    Seasonality Requested,
    HarmonicDesign Design,
    IReadOnlyList<HarmonicTerm> Terms,
    string Estimation,
    double ResidualSd,
    int Points)
{
    public double[] Mean(IReadOnlyList<DateTimeOffset> times) => Design.Evaluate(times, Terms.Select(t => t.Coefficient).ToArray());
}
