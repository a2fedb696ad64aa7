namespace ForecastHub.Core.Diagnostics;

/// <summary>Jarque-Bera normality test; Df is always 2.</summary>
public sealed record JarqueBeraResult(double Statistic, int Df, double PValue, double Skewness, double Kurtosis);
