using ForecastHub.Core.Grid;

namespace ForecastHub.Core.Tests.Grid;

public sealed class GridClockTests
{
    /// <summary>The reference is .NET's own TimeZoneInfo.ConvertTime on the machine's IANA time-zone database,
    /// hour by hour: every zone, ten years, across every daylight-saving change in them.</summary>
    [Fact]
    public void HoursMatchConvertTimeHourByHourInEveryZone()
    {
        var first = new DateTimeOffset(2018, 1, 1, 0, 0, 0, TimeSpan.Zero).UtcTicks / TimeSpan.TicksPerHour;
        const int count = 87_600 + 7;
        var zones = TimeZoneInfo.GetSystemTimeZones();
        Assert.True(zones.Count > 100, $"only {zones.Count} time zones on this machine");
        foreach (var zone in zones)
        {
            var hours = GridClock.Hours(zone, first, count);
            for (var i = 0; i < count; i++)
            {
                var expected = TimeZoneInfo.ConvertTime(new DateTimeOffset((first + i) * TimeSpan.TicksPerHour, TimeSpan.Zero), zone);
                if (hours[i] != expected || hours[i].Offset != expected.Offset)
                {
                    Assert.Fail($"{zone.Id}: hour {i} is {hours[i]:O}, ConvertTime gives {expected:O}");
                }
            }
        }
    }

    [Fact]
    public void HoursAcrossTheSpringChangeInBerlinTakeTheNewOffsetAtTheChangingHour()
    {
        // 2024-03-31 01:00 UTC: Europe/Berlin goes from UTC+1 to UTC+2 (EU summer-time rule).
        var zone = TimeZoneInfo.FindSystemTimeZoneById("Europe/Berlin");
        var first = new DateTimeOffset(2024, 3, 30, 23, 0, 0, TimeSpan.Zero).UtcTicks / TimeSpan.TicksPerHour;

        var hours = GridClock.Hours(zone, first, 4);

        Assert.Equal(["2024-03-31T00:00:00+01:00", "2024-03-31T01:00:00+01:00", "2024-03-31T03:00:00+02:00", "2024-03-31T04:00:00+02:00"],
            hours.Select(h => h.ToString("yyyy-MM-dd'T'HH:mm:sszzz", System.Globalization.CultureInfo.InvariantCulture)));
        Assert.Empty(GridClock.Hours(zone, first, 0));
    }
}
