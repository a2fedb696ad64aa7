namespace ForecastHub.Core.Selection;

/// <summary>Information criteria of one candidate order (absolute values; see docs/numerics.md for the formulas).</summary>
public sealed record OrderCriteria(int Order, double Aic, double Aicc, double Bic);
