namespace ForecastHub.Core.Grid;

/// <summary>
/// Turns stored readings into a site's regular grid (DESIGN.md section 3).
/// Hourly: the mean of the valid readings in the UTC hour [h, h+1) (the local clock hour in every
/// zone whose offset is a whole number of hours). Daily: over the local calendar day of the site's
/// IANA zone (23 or 25 hours on DST days), min and max of the valid readings, and the mean of the
/// day's hourly means (so an hour logged every minute does not outweigh an hour logged once).
/// Edge cases: flagged and non-finite readings are ignored; no valid reading and no span gives an
/// empty grid; a span with no valid reading gives an all-missing grid with no segments; an unknown
/// time zone or a negative gap limit throws <see cref="ArgumentException"/>.
/// </summary>
public static class GridBuilder
{
    /// <param name="from">Optional start of the span (inclusive); default: the first valid reading.</param>
    /// <param name="to">Optional end of the span (exclusive); default: just after the last valid reading.
    /// Steps up to <paramref name="to"/> that have no data appear as missing, so a caller can see
    /// how many of the newest steps are missing.</param>
    public static TimeGrid Build(
        IEnumerable<GridReading> readings,
        GridOptions options,
        DateTimeOffset? from = null,
        DateTimeOffset? to = null)
    {
        ArgumentNullException.ThrowIfNull(readings);
        ArgumentNullException.ThrowIfNull(options);
        ArgumentOutOfRangeException.ThrowIfNegative(options.MaxInterpolatedGap);
        if (from is { } f && to is { } t && t <= f)
        {
            throw new ArgumentException("'to' must be after 'from'.", nameof(to));
        }

        var zone = FindZone(options.TimeZone);
        return options.Cadence == GridCadence.Hourly
            ? BuildHourly(readings as IReadOnlyCollection<GridReading> ?? readings.ToArray(), options, zone, from, to)
            : BuildDaily(readings.Where(r => IsValid(r, from, to)).ToArray(), options, zone, from, to);
    }

    /// <summary>Counted in the grid: not flagged, finite, and inside the span where one is given.</summary>
    private static bool IsValid(in GridReading r, DateTimeOffset? from, DateTimeOffset? to) =>
        !r.Flagged && double.IsFinite(r.ValueC) && (from is null || r.Time >= from) && (to is null || r.Time < to);

    public static TimeZoneInfo FindZone(string timeZone)
    {
        try
        {
            return TimeZoneInfo.FindSystemTimeZoneById(timeZone);
        }
        catch (Exception e) when (e is TimeZoneNotFoundException or InvalidTimeZoneException)
        {
            throw new ArgumentException($"Unknown time zone '{timeZone}'.", nameof(timeZone), e);
        }
    }

    /// <summary>The first instant of a local calendar day (local midnight, or the first valid local
    /// time when a DST jump skips midnight; the earlier instant when midnight is repeated).</summary>
    public static DateTimeOffset LocalDayStart(DateOnly date, TimeZoneInfo zone)
    {
        ArgumentNullException.ThrowIfNull(zone);
        var local = date.ToDateTime(TimeOnly.MinValue, DateTimeKind.Unspecified);
        for (var i = 0; i < 96 && zone.IsInvalidTime(local); i++)
        {
            local = local.AddMinutes(15);
        }

        var offset = zone.IsAmbiguousTime(local) ? zone.GetAmbiguousTimeOffsets(local).Max() : zone.GetUtcOffset(local);
        return new DateTimeOffset(local, offset);
    }

    /// <summary>The local calendar date of an instant in a zone.</summary>
    public static DateOnly LocalDate(DateTimeOffset time, TimeZoneInfo zone) =>
        DateOnly.FromDateTime(TimeZoneInfo.ConvertTime(time, zone).DateTime);

    private static TimeGrid BuildHourly(IReadOnlyCollection<GridReading> readings, GridOptions options, TimeZoneInfo zone, DateTimeOffset? from, DateTimeOffset? to)
    {
        // One pass over the readings into per-hour sums (in reading order, as the mean of each hour is defined).
        var first = from is { } f ? HourIndex(f) : long.MaxValue;
        var last = to is { } t ? HourIndex(t.AddTicks(-1)) : long.MinValue;
        if (from is null || to is null)
        {
            var any = false;
            foreach (var r in readings)
            {
                if (IsValid(r, from, to))
                {
                    any = true;
                    first = from is null ? Math.Min(first, HourIndex(r.Time)) : first;
                    last = to is null ? Math.Max(last, HourIndex(r.Time)) : last;
                }
            }

            if (!any)
            {
                return Empty(options);
            }
        }

        var n = checked((int)(last - first + 1));
        var values = new double[n];
        var counts = new int[n];
        foreach (var r in readings)
        {
            if (IsValid(r, from, to))
            {
                var i = (int)(HourIndex(r.Time) - first);
                values[i] += r.ValueC;
                counts[i]++;
            }
        }

        for (var i = 0; i < n; i++)
        {
            values[i] = counts[i] > 0 ? values[i] / counts[i] : double.NaN;
        }

        return Complete(options, GridClock.Hours(zone, first, n), values);
    }

    private static TimeGrid BuildDaily(GridReading[] valid, GridOptions options, TimeZoneInfo zone, DateTimeOffset? from, DateTimeOffset? to)
    {
        var days = new Dictionary<DateOnly, List<GridReading>>();
        foreach (var r in valid)
        {
            var d = LocalDate(r.Time, zone);
            if (!days.TryGetValue(d, out var list))
            {
                days[d] = list = [];
            }

            list.Add(r);
        }

        if (days.Count == 0 && (from is null || to is null))
        {
            return Empty(options);
        }

        var first = from is { } f ? LocalDate(f, zone) : days.Keys.Min();
        var last = to is { } t ? LocalDate(t.AddTicks(-1), zone) : days.Keys.Max();
        var n = last.DayNumber - first.DayNumber + 1;
        var times = new DateTimeOffset[n];
        var values = new double[n];
        for (var i = 0; i < n; i++)
        {
            var date = first.AddDays(i);
            times[i] = LocalDayStart(date, zone);
            values[i] = days.TryGetValue(date, out var list) ? DailyValue(list, options.DailyStatistic) : double.NaN;
        }

        return Complete(options, times, values);
    }

    private static double DailyValue(List<GridReading> day, DailyStatistic statistic) => statistic switch
    {
        DailyStatistic.Min => day.Min(r => r.ValueC),
        DailyStatistic.Max => day.Max(r => r.ValueC),
        _ => day.GroupBy(r => HourIndex(r.Time)).Average(g => g.Average(r => r.ValueC)),
    };

    private static long HourIndex(DateTimeOffset time) => Math.DivRem(time.UtcTicks, TimeSpan.TicksPerHour).Quotient;

    private static TimeGrid Empty(GridOptions options) =>
        new(options.Cadence, options.TimeZone, [], [], [], [], []);

    private static TimeGrid Complete(GridOptions options, DateTimeOffset[] times, double[] values)
    {
        var n = values.Length;
        var interpolated = new bool[n];
        var gaps = new List<GridGap>();
        var i = 0;
        while (i < n)
        {
            if (!double.IsNaN(values[i]))
            {
                i++;
                continue;
            }

            var start = i;
            while (i < n && double.IsNaN(values[i]))
            {
                i++;
            }

            var length = i - start;
            var fill = start > 0 && i < n && length <= options.MaxInterpolatedGap;
            if (fill)
            {
                var left = values[start - 1];
                var right = values[i];
                for (var k = 0; k < length; k++)
                {
                    values[start + k] = left + (right - left) * (k + 1) / (length + 1);
                    interpolated[start + k] = true;
                }
            }

            gaps.Add(new GridGap(start, length, times[start], times[i - 1], fill));
        }

        return new TimeGrid(options.Cadence, options.TimeZone, times, values, interpolated, FindSegments(times, values), [.. gaps]);
    }

    private static GridSegment[] FindSegments(DateTimeOffset[] times, double[] values)
    {
        var segments = new List<GridSegment>();
        var i = 0;
        while (i < values.Length)
        {
            if (double.IsNaN(values[i]))
            {
                i++;
                continue;
            }

            var start = i;
            while (i < values.Length && !double.IsNaN(values[i]))
            {
                i++;
            }

            segments.Add(new GridSegment(start, i - start, times[start], times[i - 1]));
        }

        return [.. segments];
    }
}
