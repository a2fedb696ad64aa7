namespace ForecastHub.Core.Forecasting;

/// <summary>A central prediction interval at a level in (0, 1), e.g. 0.95.</summary>
public readonly record struct PredictionInterval(double Level, double Lower, double Upper);
