namespace ForecastHub.Core.Forecasting;

/// <summary>h-step forecast means and standard deviations; element h-1 is h steps ahead.</summary>
public sealed record ArForecastPath(double[] Mean, double[] Sd);
