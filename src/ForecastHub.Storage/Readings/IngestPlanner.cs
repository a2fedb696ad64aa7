using ForecastHub.Core.Quality;

namespace ForecastHub.Storage.Readings;

/// <summary>
/// Decides, without touching the database, what an ingest does: which readings are new, duplicates,
/// conflicts or replacements, and the QC flags of the new readings and their stored neighbours.
/// Stored readings only ever gain spike and flat-line flags from their new neighbours (a later
/// reading can reveal that an earlier one was a spike or part of a flat line); flags are never
/// taken away here, except that a replaced value is judged afresh.
/// </summary>
public static class IngestPlanner
{
    /// <summary>How far around the new readings stored neighbours are needed: the flat-line span,
    /// and at least this many readings on each side.</summary>
    public const int NeighbourCount = QualityLimits.FlatlineMinReadings;

    /// <summary>Two values this close in degrees C are the same value (unit conversion rounding).</summary>
    public const double SameValueTolerance = 1e-9;

    public static IngestPlan Plan(IReadOnlyList<StoredReading> stored, IReadOnlyList<IncomingReading> incoming,
        ConflictPolicy policy, QualityLimits limits)
    {
        ArgumentNullException.ThrowIfNull(stored);
        ArgumentNullException.ThrowIfNull(incoming);
        ArgumentNullException.ThrowIfNull(limits);
        return IsStrictlyIncreasing(stored, s => s.TimeMs) && IsStrictlyIncreasing(incoming, r => r.TimeMs)
            ? PlanSorted(stored, incoming, policy, limits)
            : PlanAnyOrder(stored, incoming, policy, limits);
    }

    /// <summary>The general plan: any order, repeats inside the batch taken one after another.</summary>
    internal static IngestPlan PlanAnyOrder(IReadOnlyList<StoredReading> stored, IReadOnlyList<IncomingReading> incoming,
        ConflictPolicy policy, QualityLimits limits)
    {
        // Slots: the stored readings first, then each new time once; a map finds a time's slot.
        var slots = new List<Slot>(stored.Count + incoming.Count);
        var slotOf = new Dictionary<long, int>(stored.Count + incoming.Count);
        foreach (var s in stored)
        {
            slotOf[s.TimeMs] = slots.Count;
            slots.Add(new Slot(s, IsStored: true, Changed: false));
        }
        var kinds = new ReadingOutcomeKind[incoming.Count];
        var storedValues = new double?[incoming.Count];
        for (var i = 0; i < incoming.Count; i++)
        {
            var r = incoming[i];
            var reading = new StoredReading(r.TimeMs, r.ValueC, r.OriginalValue, r.OriginalUnit, QualityFlags.None);
            if (!slotOf.TryGetValue(r.TimeMs, out var at))
            {
                slotOf[r.TimeMs] = slots.Count;
                slots.Add(new Slot(reading, IsStored: false, Changed: true));
                kinds[i] = ReadingOutcomeKind.Accepted;
                continue;
            }
            var slot = slots[at];
            storedValues[i] = slot.Reading.ValueC;
            kinds[i] = Meet(slot.Reading.ValueC, r.ValueC, policy);
            if (kinds[i] == ReadingOutcomeKind.Replaced)
            {
                slots[at] = slot with { Reading = reading, Changed = true };
            }
        }

        var series = slots.ToArray();
        Array.Sort(series.Select(x => x.Reading.TimeMs).ToArray(), series);
        var (flags, inserts, updates) = Judge(series, limits);
        var flagsByTime = new Dictionary<long, QualityFlags>(series.Length);
        for (var j = 0; j < series.Length; j++)
        {
            flagsByTime[series[j].Reading.TimeMs] = flags[j];
        }

        var outcomes = new ReadingOutcome[incoming.Count];
        for (var i = 0; i < incoming.Count; i++)
        {
            outcomes[i] = new ReadingOutcome(kinds[i], flagsByTime[incoming[i].TimeMs], storedValues[i]);
        }
        return new IngestPlan(inserts, updates, outcomes);
    }

    // Batch and neighbourhood both in strictly increasing time (the usual case): one merge, no map.
    private static IngestPlan PlanSorted(IReadOnlyList<StoredReading> stored, IReadOnlyList<IncomingReading> incoming,
        ConflictPolicy policy, QualityLimits limits)
    {
        var series = new Slot[stored.Count + incoming.Count];
        var slotOf = new int[incoming.Count];
        var kinds = new ReadingOutcomeKind[incoming.Count];
        var storedValues = new double?[incoming.Count];
        int n = 0, s = 0;
        for (var i = 0; i < incoming.Count; i++)
        {
            var r = incoming[i];
            while (s < stored.Count && stored[s].TimeMs < r.TimeMs)
            {
                series[n++] = new Slot(stored[s++], IsStored: true, Changed: false);
            }
            var reading = new StoredReading(r.TimeMs, r.ValueC, r.OriginalValue, r.OriginalUnit, QualityFlags.None);
            slotOf[i] = n;
            if (s < stored.Count && stored[s].TimeMs == r.TimeMs)
            {
                var old = stored[s++];
                storedValues[i] = old.ValueC;
                kinds[i] = Meet(old.ValueC, r.ValueC, policy);
                series[n++] = kinds[i] == ReadingOutcomeKind.Replaced
                    ? new Slot(reading, IsStored: true, Changed: true)
                    : new Slot(old, IsStored: true, Changed: false);
            }
            else
            {
                kinds[i] = ReadingOutcomeKind.Accepted;
                series[n++] = new Slot(reading, IsStored: false, Changed: true);
            }
        }
        while (s < stored.Count)
        {
            series[n++] = new Slot(stored[s++], IsStored: true, Changed: false);
        }
        var (flags, inserts, updates) = Judge(series.AsSpan(0, n), limits);
        var outcomes = new ReadingOutcome[incoming.Count];
        for (var i = 0; i < incoming.Count; i++)
        {
            outcomes[i] = new ReadingOutcome(kinds[i], flags[slotOf[i]], storedValues[i]);
        }
        return new IngestPlan(inserts, updates, outcomes);
    }

    // A new reading at a time already stored: the same value is a duplicate, another one a conflict or, by policy, a replacement.
    private static ReadingOutcomeKind Meet(double storedC, double incomingC, ConflictPolicy policy) =>
        Math.Abs(storedC - incomingC) <= SameValueTolerance ? ReadingOutcomeKind.Duplicate
        : policy == ConflictPolicy.Replace ? ReadingOutcomeKind.Replaced
        : ReadingOutcomeKind.Conflict;

    // QC over the time-ordered series; new flags for changed slots, stored slots only gain spike and flat-line.
    private static (QualityFlags[] Flags, List<StoredReading> Inserts, List<StoredReading> Updates) Judge(ReadOnlySpan<Slot> series, QualityLimits limits)
    {
        var points = new QualityPoint[series.Length];
        for (var j = 0; j < series.Length; j++)
        {
            points[j] = new QualityPoint(series[j].Reading.Time, series[j].Reading.ValueC);
        }
        var computed = QualityChecks.Evaluate(points, limits);
        var flags = new QualityFlags[series.Length];
        var inserts = new List<StoredReading>(series.Length);
        var updates = new List<StoredReading>();
        for (var j = 0; j < series.Length; j++)
        {
            var slot = series[j];
            flags[j] = slot.Changed
                ? computed[j]
                : slot.Reading.Flags | (computed[j] & (QualityFlags.Spike | QualityFlags.FlatLine));
            var reading = slot.Reading with { Flags = flags[j] };
            if (!slot.IsStored)
            {
                inserts.Add(reading);
            }
            else if (slot.Changed || flags[j] != slot.Reading.Flags)
            {
                updates.Add(reading);
            }
        }
        return (flags, inserts, updates);
    }

    private static bool IsStrictlyIncreasing<T>(IReadOnlyList<T> items, Func<T, long> time)
    {
        for (var i = 1; i < items.Count; i++)
        {
            if (time(items[i]) <= time(items[i - 1]))
            {
                return false;
            }
        }
        return true;
    }

    private readonly record struct Slot(StoredReading Reading, bool IsStored, bool Changed);
}

/// <summary>Rows to insert, stored rows to rewrite (new value or new flags), and the outcome of each
/// incoming reading.</summary>
public sealed record IngestPlan(IReadOnlyList<StoredReading> Inserts, IReadOnlyList<StoredReading> Updates,
    IReadOnlyList<ReadingOutcome> Outcomes)
{
    /// <summary>The result once the plan is written: its outcomes and the earliest time it writes.</summary>
    public IngestResult Result() => new(Outcomes)
    {
        EarliestChangeMs = Inserts.Concat(Updates).Select(r => (long?)r.TimeMs).Min(),
    };
}
