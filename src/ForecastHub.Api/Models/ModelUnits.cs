using ForecastHub.Api.Observations;
using ForecastHub.Core.Climatology;

namespace ForecastHub.Api.Models;

/// <summary>A model described in degrees C, stated in another unit: the level shifts and scales; amplitudes,
/// the AR mean (of anomalies), standard errors and the residuals' mean and sd are differences and only scale;
/// the innovation variance scales twice; coefficients, correlations and statistics are unitless.</summary>
public static class ModelUnits
{
    public static ModelResponse InUnit(ModelResponse model, string unit)
    {
        ArgumentNullException.ThrowIfNull(model);
        if (unit == TemperatureUnits.Celsius)
        {
            return model;
        }

        double Spread(double c) => TemperatureUnits.SpreadFromCelsius(c, unit);
        TermResponse Term(TermResponse t) => t with
        {
            Value = t.Name == HarmonicDesign.LevelTerm ? TemperatureUnits.FromCelsius(t.Value, unit) : Spread(t.Value),
            StdError = Spread(t.StdError),
        };

        return model with
        {
            Unit = unit,
            Seasonality = model.Seasonality with { Terms = [.. model.Seasonality.Terms.Select(Term)] },
            Ar = model.Ar with
            {
                Mean = Spread(model.Ar.Mean),
                InnovationVariance = TemperatureUnits.VarianceFromCelsius(model.Ar.InnovationVariance, unit),
            },
            Residuals = model.Residuals with { Mean = Spread(model.Residuals.Mean), Sd = Spread(model.Residuals.Sd) },
        };
    }
}
