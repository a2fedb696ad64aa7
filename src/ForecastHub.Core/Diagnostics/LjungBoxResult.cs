namespace ForecastHub.Core.Diagnostics;

/// <summary>Ljung-Box portmanteau test of residual whiteness.</summary>
public sealed record LjungBoxResult(int Lags, double Statistic, int Df, double PValue);
