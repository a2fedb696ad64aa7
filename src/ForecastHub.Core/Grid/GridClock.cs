namespace ForecastHub.Core.Grid;

/// <summary>Step arithmetic on a site's grid: hourly steps are UTC hours, daily steps local calendar days.</summary>
public static class GridClock
{
    /// <summary>The start of the step holding <paramref name="time"/>: its UTC hour (hourly, in UTC) or the local midnight starting its local day (daily).</summary>
    public static DateTimeOffset StepStart(GridCadence cadence, TimeZoneInfo zone, DateTimeOffset time)
    {
        ArgumentNullException.ThrowIfNull(zone);
        return cadence == GridCadence.Hourly
            ? new DateTimeOffset(time.UtcTicks - (time.UtcTicks % TimeSpan.TicksPerHour), TimeSpan.Zero)
            : GridBuilder.LocalDayStart(GridBuilder.LocalDate(time, zone), zone);
    }

    /// <summary>The same step one local day earlier: 24 hours before (hourly, as persistence compares) or the previous local day (daily).</summary>
    public static DateTimeOffset DayBefore(GridCadence cadence, TimeZoneInfo zone, DateTimeOffset stepStart) =>
        StepAfter(cadence, zone, stepStart, cadence == GridCadence.Hourly ? -24 : -1);

    /// <summary>The start of the step <paramref name="steps"/> after the step starting at <paramref name="stepStart"/>, in the zone's offset.</summary>
    public static DateTimeOffset StepAfter(GridCadence cadence, TimeZoneInfo zone, DateTimeOffset stepStart, int steps)
    {
        ArgumentNullException.ThrowIfNull(zone);
        return cadence == GridCadence.Hourly
            ? TimeZoneInfo.ConvertTime(stepStart.AddHours(steps), zone)
            : GridBuilder.LocalDayStart(GridBuilder.LocalDate(stepStart, zone).AddDays(steps), zone);
    }

    /// <summary>
    /// The starts of <paramref name="count"/> consecutive UTC hours from hour number <paramref name="firstHour"/>
    /// (hours since 0001-01-01 UTC), each in the zone's offset at that instant: what ConvertTime gives hour by hour.
    /// The offset is looked up at both ends of each day-long run and filled in between when they agree, since no
    /// zone changes its offset twice within a day (GridClockTests checks every zone of the system's database, hour by
    /// hour over ten years); else hour by hour.
    /// </summary>
    public static DateTimeOffset[] Hours(TimeZoneInfo zone, long firstHour, int count)
    {
        ArgumentNullException.ThrowIfNull(zone);
        ArgumentOutOfRangeException.ThrowIfNegative(count);
        var times = new DateTimeOffset[count];
        for (var start = 0; start < count; start += 24)
        {
            var end = Math.Min(count, start + 24) - 1;
            var offset = OffsetAt(zone, firstHour + start);
            var same = offset == OffsetAt(zone, firstHour + end);
            for (var i = start; i <= end; i++)
            {
                var utcTicks = (firstHour + i) * TimeSpan.TicksPerHour;
                var at = same ? offset : OffsetAt(zone, firstHour + i);
                times[i] = new DateTimeOffset(utcTicks + at.Ticks, at);
            }
        }

        return times;
    }

    private static TimeSpan OffsetAt(TimeZoneInfo zone, long hour) =>
        zone.GetUtcOffset(new DateTime(hour * TimeSpan.TicksPerHour, DateTimeKind.Utc));

    /// <summary>Start times of the <paramref name="count"/> steps following <paramref name="stepStart"/>.</summary>
    public static DateTimeOffset[] Following(GridCadence cadence, TimeZoneInfo zone, DateTimeOffset stepStart, int count)
    {
        var times = new DateTimeOffset[count];
        for (var k = 0; k < count; k++)
        {
            times[k] = StepAfter(cadence, zone, stepStart, k + 1);
        }

        return times;
    }
}
