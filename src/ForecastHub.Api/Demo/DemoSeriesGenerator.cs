namespace ForecastHub.Api.Demo;

/// <summary>One generated reading: the logger's own timestamp (local offset) and degrees C.</summary>
public readonly record struct DemoReading(DateTimeOffset Time, double ValueC);

/// <summary>The readings generated for one demo site.</summary>
public sealed record DemoSeries(DemoSiteProfile Site, IReadOnlyList<DemoReading> Readings);

/// <summary>
/// Seeded generator of hourly logger data: annual and daily cycles, a farm-wide AR(2)
/// weather anomaly, per-logger AR(1) noise, a spring frost night and the faults of each
/// profile. Pure: the same seed and "now" give the same readings.
/// </summary>
public static class DemoSeriesGenerator
{
    // Farm-wide weather anomaly, hourly AR(2): persistent for a day or two, sd about 1.7 C.
    private const double WeatherPhi1 = 1.25;
    private const double WeatherPhi2 = -0.30;
    private const double WeatherSigma = 0.45;
    private const double LocalPhi = 0.7;
    private const double LocalSigma = 0.22;
    private const int ColdestDayOfYear = 15;
    private const int WarmestHour = 15;

    /// <summary>Generates every site of the scenario for the hours up to <paramref name="now"/>.</summary>
    public static IReadOnlyList<DemoSeries> Generate(DateTimeOffset now, int seed = DemoScenario.DefaultSeed)
    {
        var zone = TimeZoneInfo.FindSystemTimeZoneById(DemoScenario.TimeZone);
        var lastHour = FloorToHour(now.ToUniversalTime());
        var hours = DemoScenario.HistoryDays * 24;
        var firstHour = lastHour.AddHours(-(hours - 1));
        var weather = WeatherAnomaly(hours, new Random(seed));
        var frostNight = FrostNightStart(now, zone);

        var result = new List<DemoSeries>();
        for (var s = 0; s < DemoScenario.Sites.Count; s++)
        {
            var site = DemoScenario.Sites[s];
            var random = new Random(unchecked(seed * 31 + s + 1));
            result.Add(new DemoSeries(site, SiteReadings(site, firstHour, weather, frostNight, zone, now, random)));
        }
        return result;
    }

    private static List<DemoReading> SiteReadings(
        DemoSiteProfile site, DateTimeOffset firstHour, double[] weather, DateTimeOffset frostNight,
        TimeZoneInfo zone, DateTimeOffset now, Random random)
    {
        var hours = weather.Length;
        var faults = site.Faults;
        var historyStart = hours - (faults.HistoryDays ?? DemoScenario.HistoryDays) * 24;
        var readings = new List<DemoReading>(hours);
        var local = 0.0;
        double? stuckValue = null;
        for (var i = 0; i < hours; i++)
        {
            local = LocalPhi * local + LocalSigma * Gaussian(random);
            var hoursAgo = hours - 1 - i;
            var utc = firstHour.AddHours(i);
            // Loggers wake on the hour and post a few seconds later; the cold store's controller is exact.
            var seconds = site.Kind == DemoSiteKind.ColdStore ? 0 : random.Next(3, 41);
            var time = TimeZoneInfo.ConvertTime(utc.AddSeconds(seconds), zone);
            if (i < historyStart || time > now || hoursAgo < faults.SilentLastHours || InGap(faults, hoursAgo))
            {
                continue;
            }

            // The cold store's controller holds the air steady: half the orchard's local noise.
            var noise = site.Kind == DemoSiteKind.ColdStore ? 0.5 * local : local;
            var value = Expected(site, time, zone) + site.WeatherGain * weather[i] + noise;
            if (site.FrostTargetC is { } target)
            {
                value = WithFrost(value, target, time, frostNight);
            }
            if (faults.SpikeDaysAgo is { } spikeDays && hoursAgo == spikeDays * 24 + 10)
            {
                value += 14.0;
            }
            if (hoursAgo < faults.StuckLastHours)
            {
                stuckValue ??= Math.Round(value, 2);
                value = stuckValue.Value;
            }
            readings.Add(new DemoReading(time, Math.Round(value, 2)));
        }
        return readings;
    }

    private static bool InGap(DemoFaults faults, int hoursAgo) =>
        faults.GapStartDaysAgo is { } days && hoursAgo <= days * 24 && hoursAgo > days * 24 - faults.GapHours;

    /// <summary>Annual and daily cycle at a local time. Additive, as the model's climatology is, so that a
    /// healthy logger's residuals come out white and the demo shows "ok" beside the faulty ones.</summary>
    private static double Expected(DemoSiteProfile site, DateTimeOffset time, TimeZoneInfo zone)
    {
        // The sun keeps standard time: the daily cycle does not jump with daylight saving.
        var solar = time.ToOffset(zone.BaseUtcOffset);
        var season = -Math.Cos(2 * Math.PI * (solar.DayOfYear - ColdestDayOfYear) / 365.25);
        var hour = solar.Hour + solar.Minute / 60.0;
        var daily = Math.Cos(2 * Math.PI * (hour - WarmestHour) / 24) + 0.25 * Math.Cos(4 * Math.PI * (hour - WarmestHour + 2) / 24);
        return site.AnnualMeanC + site.AnnualAmplitudeC * season + site.DiurnalAmplitudeC * daily;
    }

    /// <summary>A clear, still spring night: temperatures sink towards the site's frost target by 04:00.</summary>
    private static double WithFrost(double value, double target, DateTimeOffset time, DateTimeOffset nightStart)
    {
        var hoursIn = (time - nightStart).TotalHours;
        const double nightLength = 14.0;
        if (hoursIn <= 0 || hoursIn >= nightLength || value <= target)
        {
            return value;
        }
        // Weight 1 at 04:00 local (8 hours in), falling smoothly to 0 at 18:00 and 08:00.
        var weight = hoursIn <= 8 ? Math.Sin(Math.PI / 2 * hoursIn / 8) : Math.Cos(Math.PI / 2 * (hoursIn - 8) / 6);
        weight *= weight;
        return value - weight * (value - target);
    }

    /// <summary>20:00 local on the most recent 20 April that lies at least two days back.</summary>
    private static DateTimeOffset FrostNightStart(DateTimeOffset now, TimeZoneInfo zone)
    {
        var localNow = TimeZoneInfo.ConvertTime(now, zone);
        var year = localNow.Year;
        while (true)
        {
            var night = new DateTime(year, 4, 20, 20, 0, 0, DateTimeKind.Unspecified);
            var start = new DateTimeOffset(night, zone.GetUtcOffset(night));
            if (start <= now.AddDays(-2))
            {
                return start;
            }
            year--;
        }
    }

    private static double[] WeatherAnomaly(int hours, Random random)
    {
        var series = new double[hours];
        double previous = 0, beforePrevious = 0;
        // Burn-in so the series starts in its stationary state.
        for (var i = -500; i < hours; i++)
        {
            var next = WeatherPhi1 * previous + WeatherPhi2 * beforePrevious + WeatherSigma * Gaussian(random);
            beforePrevious = previous;
            previous = next;
            if (i >= 0)
            {
                series[i] = next;
            }
        }
        return series;
    }

    private static DateTimeOffset FloorToHour(DateTimeOffset utc) =>
        new(utc.Year, utc.Month, utc.Day, utc.Hour, 0, 0, TimeSpan.Zero);

    // Box-Muller: enough for demo noise and reproducible from System.Random's seeded sequence.
    private static double Gaussian(Random random)
    {
        var u1 = 1.0 - random.NextDouble();
        var u2 = random.NextDouble();
        return Math.Sqrt(-2.0 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
    }
}
