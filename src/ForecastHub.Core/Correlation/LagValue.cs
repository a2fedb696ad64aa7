namespace ForecastHub.Core.Correlation;

/// <summary>A value at a lag (ACF or PACF entry).</summary>
public sealed record LagValue(int Lag, double Value);
