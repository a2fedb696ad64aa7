using ForecastHub.Core.Grid;

namespace ForecastHub.Core.Tests.Support;

/// <summary>Grid and model test-data factories.</summary>
internal static class SomeGrid
{
    public static readonly DateTimeOffset Start = new(2024, 1, 1, 0, 0, 0, TimeSpan.Zero);

    /// <summary>One reading per hour from <paramref name="start"/>, value given by the hour index.</summary>
    public static List<GridReading> HourlyReadings(DateTimeOffset start, int hours, Func<int, double> value) =>
        Enumerable.Range(0, hours).Select(i => new GridReading(start.AddHours(i), value(i))).ToList();

    public static GridOptions Hourly(string zone = "UTC", int maxGap = 3) => new(GridCadence.Hourly, zone, MaxInterpolatedGap: maxGap);

    public static GridOptions Daily(DailyStatistic statistic, string zone = "Europe/Berlin") => new(GridCadence.Daily, zone, statistic);

    /// <summary>An hourly grid in UTC built from values (NaN = missing) starting at <see cref="Start"/>.</summary>
    public static TimeGrid HourlyGrid(double[] values, string zone = "UTC", int maxGap = 3) =>
        GridBuilder.Build(
            values.Select((v, i) => new GridReading(Start.AddHours(i), v)),
            Hourly(zone, maxGap),
            Start,
            Start.AddHours(values.Length));

    /// <summary>A daily grid (one reading at local noon per day) starting on 2012-01-01.</summary>
    public static TimeGrid DailyGrid(double[] values, string zone = "UTC", DateOnly? first = null)
    {
        var zoneInfo = GridBuilder.FindZone(zone);
        var day0 = first ?? new DateOnly(2012, 1, 1);
        var readings = values.Select((v, i) => new GridReading(GridBuilder.LocalDayStart(day0.AddDays(i), zoneInfo).AddHours(12), v));
        return GridBuilder.Build(
            readings,
            new GridOptions(GridCadence.Daily, zone, DailyStatistic.Max),
            GridBuilder.LocalDayStart(day0, zoneInfo),
            GridBuilder.LocalDayStart(day0.AddDays(values.Length), zoneInfo));
    }

    /// <summary>
    /// Hourly temperatures in Europe/Berlin from 2021-01-01: annual and diurnal cycles plus an AR(2)
    /// anomaly whose innovation sd varies with the season (winter 1.5 times summer), Gaussian, seeded.
    /// </summary>
    public static double[] SeasonalHourlyValues(int hours, int seed)
    {
        var random = new Random(seed);
        var values = new double[hours];
        double a1 = 0, a2 = 0;
        for (var t = -500; t < hours; t++)
        {
            var day = t / 24.0;
            var sd = 0.8 * (1 + 0.25 * Math.Cos(2 * Math.PI * day / 365.25));
            var a = 1.1 * a1 - 0.25 * a2 + sd * SomeAr.Gaussian(random);
            (a2, a1) = (a1, a);
            if (t >= 0)
            {
                values[t] = 10 - 8 * Math.Cos(2 * Math.PI * (day - 15) / 365.25) - 4 * Math.Cos(2 * Math.PI * ((t % 24) - 14) / 24) + a;
            }
        }

        return values;
    }

    public static TimeGrid SeasonalHourlyGrid(int hours, int seed)
    {
        var start = new DateTimeOffset(2021, 1, 1, 0, 0, 0, TimeSpan.Zero);
        var values = SeasonalHourlyValues(hours, seed);
        return GridBuilder.Build(values.Select((v, i) => new GridReading(start.AddHours(i), v)), Hourly("Europe/Berlin"));
    }
}
