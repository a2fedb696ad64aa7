namespace ForecastHub.Core.Quality;

/// <summary>
/// The QC rules of DESIGN section 3 as pure functions over one site's readings.
/// Input must be sorted by strictly increasing time (a series of stored readings, new and
/// neighbouring). Empty input gives an empty result; a single reading can only be out of range;
/// NaN or infinite values and unsorted or repeated times throw <see cref="ArgumentException"/>.
/// </summary>
public static class QualityChecks
{
    /// <summary>All flags of every reading, in input order.</summary>
    public static QualityFlags[] Evaluate(IReadOnlyList<QualityPoint> series, QualityLimits limits)
    {
        ArgumentNullException.ThrowIfNull(series);
        ArgumentNullException.ThrowIfNull(limits);
        Validate(series);
        var flags = new QualityFlags[series.Count];
        for (var i = 0; i < series.Count; i++)
        {
            if (IsOutOfRange(series[i].ValueC, limits))
            {
                flags[i] |= QualityFlags.OutOfRange;
            }
            if (IsSpike(series, i, limits.MaxStepCPerHour))
            {
                flags[i] |= QualityFlags.Spike;
            }
        }
        foreach (var (start, length) in FlatLineRuns(series, limits.FlatlineHours))
        {
            for (var i = start; i < start + length; i++)
            {
                flags[i] |= QualityFlags.FlatLine;
            }
        }
        return flags;
    }

    /// <summary>Outside the site's own limits (inclusive limits are inside).</summary>
    public static bool IsOutOfRange(double valueC, QualityLimits limits)
    {
        ArgumentNullException.ThrowIfNull(limits);
        return valueC < limits.MinC || valueC > limits.MaxC;
    }

    /// <summary>
    /// Reading <paramref name="i"/> jumps away from both neighbours in opposite directions (it lies
    /// above both or below both), each jump larger than <paramref name="maxStepCPerHour"/> times the
    /// hours between the two readings, counting at least one hour. The first and last readings have
    /// only one neighbour and are never spikes.
    /// </summary>
    public static bool IsSpike(IReadOnlyList<QualityPoint> series, int i, double maxStepCPerHour)
    {
        ArgumentNullException.ThrowIfNull(series);
        if (i <= 0 || i >= series.Count - 1)
        {
            return false;
        }
        var (prev, here, next) = (series[i - 1], series[i], series[i + 1]);
        var rise = here.ValueC - prev.ValueC;
        var fall = here.ValueC - next.ValueC;
        var awayFromBoth = (rise > 0 && fall > 0) || (rise < 0 && fall < 0);
        return awayFromBoth
            && Math.Abs(rise) > maxStepCPerHour * HoursAtLeastOne(prev.Time, here.Time)
            && Math.Abs(fall) > maxStepCPerHour * HoursAtLeastOne(here.Time, next.Time);
    }

    /// <summary>Runs (start index, length) of at least six consecutive identical values whose first
    /// and last readings are at least <paramref name="flatlineHours"/> apart.</summary>
    public static IReadOnlyList<(int Start, int Length)> FlatLineRuns(IReadOnlyList<QualityPoint> series, double flatlineHours)
    {
        ArgumentNullException.ThrowIfNull(series);
        var runs = new List<(int, int)>();
        var start = 0;
        for (var i = 1; i <= series.Count; i++)
        {
            // Identical means equal in degrees C: a stuck sensor repeats its value exactly.
            if (i < series.Count && series[i].ValueC == series[start].ValueC)
            {
                continue;
            }
            var length = i - start;
            if (length >= QualityLimits.FlatlineMinReadings
                && (series[i - 1].Time - series[start].Time).TotalHours >= flatlineHours)
            {
                runs.Add((start, length));
            }
            start = i;
        }
        return runs;
    }

    private static double HoursAtLeastOne(DateTimeOffset from, DateTimeOffset to) =>
        Math.Max(1.0, (to - from).TotalHours);

    private static void Validate(IReadOnlyList<QualityPoint> series)
    {
        for (var i = 0; i < series.Count; i++)
        {
            if (!double.IsFinite(series[i].ValueC))
            {
                throw new ArgumentException($"Reading {i} has a non-finite value.", nameof(series));
            }
            if (i > 0 && series[i].Time <= series[i - 1].Time)
            {
                throw new ArgumentException($"Reading {i} is not later than reading {i - 1}.", nameof(series));
            }
        }
    }
}
