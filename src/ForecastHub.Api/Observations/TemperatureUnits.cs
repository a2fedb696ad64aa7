namespace ForecastHub.Api.Observations;

/// <summary>Units readings may arrive in, converted to degrees C for storage.</summary>
public static class TemperatureUnits
{
    public const string Celsius = "C";
    public const string Fahrenheit = "F";
    public const string Kelvin = "K";

    public static bool IsKnown(string? unit) => unit is Celsius or Fahrenheit or Kelvin;

    public static double ToCelsius(double value, string unit) => unit switch
    {
        Celsius => value,
        Fahrenheit => (value - 32) * 5 / 9,
        Kelvin => value - 273.15,
        _ => throw new ArgumentException($"Unknown unit '{unit}'.", nameof(unit)),
    };

    /// <summary>A temperature stored in degrees C, in <paramref name="unit"/>.</summary>
    public static double FromCelsius(double value, string unit) => unit switch
    {
        Celsius => value,
        Fahrenheit => (value * 9 / 5) + 32,
        Kelvin => value + 273.15,
        _ => throw new ArgumentException($"Unknown unit '{unit}'.", nameof(unit)),
    };

    /// <summary>A temperature difference (a standard deviation, an interval width) in <paramref name="unit"/>.</summary>
    public static double SpreadFromCelsius(double value, string unit) => unit == Fahrenheit ? value * 9 / 5 : value;

    /// <summary>A variance of temperatures (squared degrees) in <paramref name="unit"/>: the scale applies twice.</summary>
    public static double VarianceFromCelsius(double value, string unit) => unit == Fahrenheit ? value * 81 / 25 : value;

    /// <summary>The unit as exports spell it ('°C', 'degF', 'c') in the contract's form; other text unchanged (and refused later).</summary>
    public static string Normalise(string unit)
    {
        ArgumentNullException.ThrowIfNull(unit);
        var u = unit.Trim().TrimStart('°', 'º');
        if (u.StartsWith("deg", StringComparison.OrdinalIgnoreCase))
        {
            u = u[3..].TrimStart(' ', '_');
        }
        return u.ToUpperInvariant() switch
        {
            "C" or "CELSIUS" => Celsius,
            "F" or "FAHRENHEIT" => Fahrenheit,
            "K" or "KELVIN" => Kelvin,
            _ => unit,
        };
    }

    public const string UnknownUnitMessage = "unit must be 'C', 'F' or 'K'.";
}
