namespace ForecastHub.TestData;

/// <summary>
/// Seeded synthetic temperature series for tests and benchmarks: an annual cycle, a daily cycle
/// peaking mid-afternoon local time, and AR(1) anomalies (phi 0.9, innovation sd 0.6 C), so the
/// series behaves like a logger's hourly record and is the same for the same seed.
/// </summary>
public static class SyntheticSeries
{
    public const double AnnualMeanC = 10;
    public const double AnnualAmplitudeC = 8;
    public const double DailyAmplitudeC = 4;
    public const double Phi = 0.9;
    public const double InnovationSd = 0.6;

    /// <summary>Hourly readings on the hour from <paramref name="start"/> (kept in its offset).</summary>
    public static IReadOnlyList<(DateTimeOffset Time, double ValueC)> Hourly(DateTimeOffset start, int hours, int seed) =>
        Hourly(start, hours, seed, [Phi]);

    /// <summary>As <see cref="Hourly(DateTimeOffset, int, int)"/> with AR(p) anomalies of the given coefficients.</summary>
    public static IReadOnlyList<(DateTimeOffset Time, double ValueC)> Hourly(DateTimeOffset start, int hours, int seed, double[] phi)
    {
        var random = new Random(seed);
        var past = new double[phi.Length];
        var result = new (DateTimeOffset, double)[hours];
        for (var i = 0; i < hours; i++)
        {
            var time = start.AddHours(i);
            var anomaly = InnovationSd * Gaussian(random);
            for (var k = 0; k < phi.Length; k++)
            {
                anomaly += phi[k] * past[k];
            }

            Array.Copy(past, 0, past, 1, past.Length - 1);
            past[0] = anomaly;
            result[i] = (time, Math.Round(Climate(time) + anomaly, 2));
        }

        return result;
    }

    /// <summary>Hourly readings ending at the hour before <paramref name="end"/>.</summary>
    public static IReadOnlyList<(DateTimeOffset Time, double ValueC)> HourlyUntil(DateTimeOffset end, int hours, int seed) =>
        Hourly(end.AddHours(-hours), hours, seed);

    /// <summary>The noise-free part of the series at <paramref name="time"/>.</summary>
    public static double Climate(DateTimeOffset time)
    {
        var local = time.DateTime;
        var annual = -AnnualAmplitudeC * Math.Cos(2 * Math.PI * (local.DayOfYear - 15) / 365.25);
        var daily = -DailyAmplitudeC * Math.Cos(2 * Math.PI * (local.Hour + (local.Minute / 60.0) - 3) / 24);
        return AnnualMeanC + annual + daily;
    }

    // Box-Muller; two uniforms make one standard normal draw.
    private static double Gaussian(Random random)
    {
        var u1 = 1.0 - random.NextDouble();
        var u2 = random.NextDouble();
        return Math.Sqrt(-2.0 * Math.Log(u1)) * Math.Cos(2.0 * Math.PI * u2);
    }
}
