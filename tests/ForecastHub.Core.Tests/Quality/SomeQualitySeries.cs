using ForecastHub.Core.Quality;

namespace ForecastHub.Core.Tests.Quality;

/// <summary>Reading series for the QC rules.</summary>
public static class SomeQualitySeries
{
    public static readonly DateTimeOffset Start = new(2025, 3, 1, 0, 0, 0, TimeSpan.Zero);

    /// <summary>Readings <paramref name="step"/> apart starting at <see cref="Start"/>.</summary>
    public static QualityPoint[] Evenly(TimeSpan step, params double[] values) =>
        values.Select((v, i) => new QualityPoint(Start + (step * i), v)).ToArray();

    public static QualityPoint[] Hourly(params double[] values) => Evenly(TimeSpan.FromHours(1), values);

    public static QualityPoint[] Daily(params double[] values) => Evenly(TimeSpan.FromDays(1), values);

    /// <summary>Realistic daily maxima over two years: an annual cycle, weather noise rounded to
    /// 0.1 C as loggers report, with seeded randomness.</summary>
    public static QualityPoint[] DailyMaxima(int days, int seed)
    {
        var random = new Random(seed);
        return Daily(Enumerable.Range(0, days)
            .Select(d => Math.Round(14 + (10 * Math.Sin(2 * Math.PI * (d - 100) / 365.25)) + (3 * ((random.NextDouble() * 2) - 1)), 1))
            .ToArray());
    }

    /// <summary>Hourly readings with a daily cycle of the given amplitude, rounded to 0.1 C.</summary>
    public static QualityPoint[] HourlyCycle(int hours, double amplitude, int seed)
    {
        var random = new Random(seed);
        return Hourly(Enumerable.Range(0, hours)
            .Select(h => Math.Round(10 + (amplitude * Math.Sin(2 * Math.PI * h / 24)) + (0.3 * random.NextDouble()), 1))
            .ToArray());
    }

    public static QualityFlags[] Flags(QualityPoint[] series) => QualityChecks.Evaluate(series, QualityLimits.Default);
}
