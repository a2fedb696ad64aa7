using ForecastHub.Api.Observations;

namespace ForecastHub.Api.Forecasts;

/// <summary>A forecast computed in degrees C, stated in another unit: values shift and scale,
/// standard deviations only scale; probabilities are unchanged.</summary>
public static class ForecastUnits
{
    public static ForecastResponse InUnit(ForecastResponse forecast, string unit)
    {
        ArgumentNullException.ThrowIfNull(forecast);
        if (unit == TemperatureUnits.Celsius)
        {
            return forecast;
        }

        double Value(double c) => TemperatureUnits.FromCelsius(c, unit);
        IReadOnlyList<ForecastInterval> Intervals(IReadOnlyList<ForecastInterval> list) =>
            [.. list.Select(i => i with { Lower = Value(i.Lower), Upper = Value(i.Upper) })];
        DaySummaryValue Day(DaySummaryValue d) => new(Value(d.Mean), Intervals(d.Intervals));

        return forecast with
        {
            Unit = unit,
            Steps = [.. forecast.Steps.Select(s => new ForecastStepResponse(s.Time, Value(s.Mean), TemperatureUnits.SpreadFromCelsius(s.Sd, unit), Intervals(s.Intervals),
                [.. s.Probabilities.Select(p => p with { Threshold = Math.Round(Value(p.Threshold), 9) })]))],
            Risk = [.. forecast.Risk.Select(r => r with { Threshold = Math.Round(Value(r.Threshold), 9), Extreme = Day(r.Extreme) })],
            NextDay = forecast.NextDay is { } day
                ? day with
                {
                    Min = Day(day.Min),
                    Max = Day(day.Max),
                    Mean = Day(day.Mean),
                    Probabilities = [.. day.Probabilities.Select(p => p with { Threshold = Math.Round(Value(p.Threshold), 9) })],
                }
                : null,
        };
    }
}
