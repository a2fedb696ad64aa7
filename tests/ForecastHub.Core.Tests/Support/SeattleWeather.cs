using ForecastHub.Core.Grid;

namespace ForecastHub.Core.Tests.Support;

/// <summary>Seattle daily max/min 2012-2015 (NOAA via vega-datasets 3.2.1; see Fixtures/seattle-weather.ATTRIBUTION.md).</summary>
internal static class SeattleWeather
{
    public const string Zone = "America/Los_Angeles";

    public static (DateOnly[] Dates, double[] Max, double[] Min) Load()
    {
        var rows = File.ReadAllLines(ReferenceFixture.PathOf("seattle-weather.csv")).Skip(1).Select(l => l.Split(',')).ToArray();
        return (
            rows.Select(r => DateOnly.Parse(r[0], System.Globalization.CultureInfo.InvariantCulture)).ToArray(),
            rows.Select(r => double.Parse(r[1], System.Globalization.CultureInfo.InvariantCulture)).ToArray(),
            rows.Select(r => double.Parse(r[2], System.Globalization.CultureInfo.InvariantCulture)).ToArray());
    }

    /// <summary>A daily grid of one statistic, readings placed at local noon of each date.</summary>
    public static TimeGrid Grid(DateOnly[] dates, double[] values, DailyStatistic statistic) =>
        GridBuilder.Build(Readings(dates, values), new GridOptions(GridCadence.Daily, Zone, statistic));

    /// <summary>One reading at local noon of each date.</summary>
    public static GridReading[] Readings(DateOnly[] dates, double[] values)
    {
        var zone = GridBuilder.FindZone(Zone);
        return [.. dates.Select((d, i) => new GridReading(GridBuilder.LocalDayStart(d, zone).AddHours(12), values[i]))];
    }
}
