using System.Globalization;
using System.Text;
using MathNet.Numerics.Distributions;

namespace ForecastHub.Api.Forecasts;

/// <summary>
/// The forecast path as RFC 4180 CSV (CRLF line ends, one header row):
/// <c>time,mean,sd,lower80,upper80,lower95,upper95</c> for the requested levels, then
/// <c>p_below_T</c>/<c>p_above_T</c> per requested threshold: the chance that the step's value is
/// below (above) T under a normal distribution with the step's mean and sd. Numbers are invariant
/// (dot decimal), times ISO 8601 UTC, temperatures in the answer's unit.
/// </summary>
public static class ForecastCsv
{
    public const string ContentType = "text/csv; charset=utf-8; header=present";

    public static string Write(ForecastResponse forecast, IReadOnlyList<double> below, IReadOnlyList<double> above)
    {
        ArgumentNullException.ThrowIfNull(forecast);
        ArgumentNullException.ThrowIfNull(below);
        ArgumentNullException.ThrowIfNull(above);
        var levels = forecast.Steps.Count > 0 ? forecast.Steps[0].Intervals.Select(i => i.Level).ToList() : [];
        var text = new StringBuilder("time,mean,sd");
        foreach (var level in levels)
        {
            text.Append(",lower").Append(Name(level)).Append(",upper").Append(Name(level));
        }

        foreach (var t in below)
        {
            text.Append(",p_below_").Append(Name(t));
        }

        foreach (var t in above)
        {
            text.Append(",p_above_").Append(Name(t));
        }

        text.Append("\r\n");
        foreach (var step in forecast.Steps)
        {
            text.Append(step.Time.UtcDateTime.ToString("yyyy-MM-dd'T'HH:mm:ss'Z'", CultureInfo.InvariantCulture))
                .Append(',').Append(Number(step.Mean)).Append(',').Append(Number(step.Sd));
            foreach (var interval in step.Intervals)
            {
                text.Append(',').Append(Number(interval.Lower)).Append(',').Append(Number(interval.Upper));
            }

            foreach (var t in below)
            {
                text.Append(',').Append(Number(Normal.CDF(step.Mean, step.Sd, t)));
            }

            foreach (var t in above)
            {
                text.Append(',').Append(Number(1 - Normal.CDF(step.Mean, step.Sd, t)));
            }

            text.Append("\r\n");
        }

        return text.ToString();
    }

    // A column name part: 80 -> "80", 97.5 -> "97.5", -2 -> "-2"; no character needs quoting.
    private static string Name(double value) => value.ToString("0.###", CultureInfo.InvariantCulture);

    private static string Number(double value) => Math.Round(value, 6).ToString("R", CultureInfo.InvariantCulture);
}
