using System.Numerics;
using ForecastHub.Core.Forecasting;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;

namespace ForecastHub.Core.Risk;

/// <summary>A window as horizons (1-based, counted from the newest value) of the forecast's steps.</summary>
public sealed record WindowPlan(RiskWindow Window, int FirstHorizon, int LastHorizon);

/// <summary>
/// The risk windows of a site and the chance of crossing a threshold in each (DESIGN section 10).
/// Hourly sites: <c>night</c> (the night holding <c>now</c> until its end while a forecast step falls in it, else the
/// coming one) and
/// <c>next24h</c> (the 24 hourly steps after the newest value). Daily sites: <c>next24h</c> is the next
/// local day that starts after <c>now</c>, and there is no night. Only forecast steps count: hours of
/// the window already observed are not reassessed.
/// </summary>
public static class RiskWindows
{
    /// <summary>The windows for forecast step start times <paramref name="times"/> (times[k] is horizon k + 1);
    /// a window that no step overlaps is left out, and one longer than <paramref name="times"/> is cut at its end.</summary>
    public static IReadOnlyList<WindowPlan> Plan(GridCadence cadence, TimeZoneInfo zone, NightHours night, DateTimeOffset now, IReadOnlyList<DateTimeOffset> times)
    {
        ArgumentNullException.ThrowIfNull(zone);
        ArgumentNullException.ThrowIfNull(night);
        ArgumentNullException.ThrowIfNull(times);
        var plans = new List<WindowPlan>();
        if (times.Count == 0)
        {
            return plans;
        }

        if (cadence == GridCadence.Daily)
        {
            for (var k = 0; k < times.Count; k++)
            {
                if (times[k] > now)
                {
                    var end = GridClock.StepAfter(cadence, zone, times[k], 1);
                    plans.Add(new WindowPlan(new RiskWindow(RiskWindow.Next24h, times[k], end), k + 1, k + 1));
                    break;
                }
            }

            return plans;
        }

        var (from, to) = NightAround(zone, night, now);
        var nightPlan = Overlap(new RiskWindow(RiskWindow.Night, from, to), times);
        if (nightPlan is null && from == now)
        {
            // The last of the night holds no forecast step (say 08:15, steps from 09:00, the night ending at 09:00): the coming night.
            (from, to) = NightAround(zone, night, to);
            nightPlan = Overlap(new RiskWindow(RiskWindow.Night, from, to), times);
        }

        if (nightPlan is not null)
        {
            plans.Add(nightPlan);
        }

        var next24From = times[0];
        plans.Add(new WindowPlan(new RiskWindow(RiskWindow.Next24h, next24From, next24From.AddHours(24)), 1, Math.Min(24, times.Count)));
        return plans;
    }

    /// <summary>How many hourly horizons after the newest value the windows can need: the night ends within 48 hours of now.</summary>
    public static int HorizonsNeeded(GridCadence cadence, DateTimeOffset lastData, DateTimeOffset now) =>
        cadence == GridCadence.Daily
            ? (int)Math.Ceiling((now - lastData).TotalDays) + 2
            : (int)Math.Ceiling((now - lastData).TotalHours) + 48;

    /// <summary>The night holding <paramref name="now"/> (from now to its end) or else the next one, as instants.</summary>
    public static (DateTimeOffset From, DateTimeOffset To) NightAround(TimeZoneInfo zone, NightHours night, DateTimeOffset now)
    {
        ArgumentNullException.ThrowIfNull(zone);
        ArgumentNullException.ThrowIfNull(night);
        var today = GridBuilder.LocalDate(now, zone);
        for (var d = -1; d <= 1; d++)
        {
            var startDate = today.AddDays(d);
            var start = LocalInstant(zone, startDate, night.Start);
            var end = LocalInstant(zone, night.End > night.Start ? startDate : startDate.AddDays(1), night.End);
            if (end > now)
            {
                return (start > now ? start : now, end);
            }
        }

        throw new InvalidOperationException("No night ends within two days of now.");
    }

    /// <summary>
    /// Window risks from one set of seeded paths (window chance = share of paths with at least one step
    /// beyond; a one-step window uses its step's exact probability). Each step's scores and values are
    /// computed once, however many windows and thresholds share the step.
    /// </summary>
    internal static IReadOnlyList<WindowRisk> Assess(
        IReadOnlyList<PredictiveDistribution> steps,
        IReadOnlyList<DateTimeOffset> times,
        double stepHours,
        SamplePaths paths,
        IReadOnlyList<WindowPlan> windows,
        IReadOnlyList<RiskThreshold> thresholds,
        IReadOnlyList<double> levels)
    {
        var n = paths.Count;
        var min = new double[windows.Count][];
        var max = new double[windows.Count][];
        var firstCross = new double[windows.Count, thresholds.Count][];
        var beyond = new long[windows.Count, thresholds.Count];
        for (var w = 0; w < windows.Count; w++)
        {
            min[w] = new double[n];
            max[w] = new double[n];
            Array.Fill(min[w], double.PositiveInfinity);
            Array.Fill(max[w], double.NegativeInfinity);
            for (var t = 0; t < thresholds.Count; t++)
            {
                firstCross[w, t] = new double[n];
                Array.Fill(firstCross[w, t], Unmarked);
            }
        }

        var scores = new double[n];
        var values = new double[n];
        var from = windows.Min(p => p.FirstHorizon) - 1;
        var to = windows.Max(p => p.LastHorizon);
        for (var k = from; k < to; k++)
        {
            var step = steps[k];
            paths.Scores(k, step.Sd, scores);

            // The step's values per path, by the copula mapping of its scores.
            for (var j = 0; j < n; j++)
            {
                values[j] = step.ValueAtScore(scores[j]);
            }

            for (var w = 0; w < windows.Count; w++)
            {
                var first = windows[w].FirstHorizon - 1;
                if (k < first || k >= windows[w].LastHorizon)
                {
                    continue;
                }

                Extremes(values, min[w], max[w]);
                for (var t = 0; t < thresholds.Count; t++)
                {
                    // Crossing compares scores with the step's score of the threshold: exact, since Q is increasing.
                    var below = thresholds[t].Direction == ThresholdDirection.Below;
                    beyond[w, t] += Cross(scores, step.ScoreOf(thresholds[t].ValueC), below, firstCross[w, t], k - first);
                }
            }
        }

        var risks = new List<WindowRisk>();
        for (var w = 0; w < windows.Count; w++)
        {
            var plan = windows[w];
            var first = plan.FirstHorizon - 1;
            var length = plan.LastHorizon - plan.FirstHorizon + 1;
            DistributionSummary? lowest = null;
            DistributionSummary? highest = null;
            for (var t = 0; t < thresholds.Count; t++)
            {
                var threshold = thresholds[t];
                var below = threshold.Direction == ThresholdDirection.Below;

                // How many paths first cross at each step of the window; the crossing paths' quantiles read off it.
                var crossingAt = new int[length];
                foreach (var c in firstCross[w, t])
                {
                    if (c >= 0)
                    {
                        crossingAt[(int)c]++;
                    }
                }

                var crossing = crossingAt.Sum();
                var probability = length == 1 ? steps[first].Probability(threshold.Direction, threshold.ValueC) : crossing / (double)n;
                CrossingTimes? firstCrossing = null;
                if (length == 1 && probability > 0)
                {
                    firstCrossing = new CrossingTimes(times[first], times[first], times[first]);
                }
                else if (crossing > 0)
                {
                    firstCrossing = new CrossingTimes(times[first + TypeOne(crossingAt, crossing, 0.5)], times[first + TypeOne(crossingAt, crossing, 0.1)], times[first + TypeOne(crossingAt, crossing, 0.9)]);
                }

                double? hours = stepHours > 0 ? beyond[w, t] * stepHours / n : null;
                var extreme = below ? lowest ??= DistributionSummary.OfSample(min[w], levels) : highest ??= DistributionSummary.OfSample(max[w], levels);
                risks.Add(new WindowRisk(threshold, plan.Window, probability, firstCrossing, hours, extreme));
            }
        }

        return risks;
    }

    // A path's first crossing before it has crossed; crossings are step offsets 0, 1, ... held as doubles to share the scores' vectors.
    private const double Unmarked = -1;

    /// <summary>Lowers each path's <paramref name="min"/> and raises its <paramref name="max"/> to its value at this step.</summary>
    private static void Extremes(ReadOnlySpan<double> values, Span<double> min, Span<double> max)
    {
        var width = Vector<double>.Count;
        var j = 0;
        for (; j <= values.Length - width; j += width)
        {
            var value = new Vector<double>(values[j..]);
            Vector.Min(new Vector<double>(min[j..]), value).CopyTo(min[j..]);
            Vector.Max(new Vector<double>(max[j..]), value).CopyTo(max[j..]);
        }

        for (; j < values.Length; j++)
        {
            min[j] = Math.Min(min[j], values[j]);
            max[j] = Math.Max(max[j], values[j]);
        }
    }

    /// <summary>How many paths are beyond the threshold's score <paramref name="limit"/> at this step; those not yet
    /// marked get <paramref name="step"/> as their first crossing.</summary>
    private static long Cross(ReadOnlySpan<double> scores, double limit, bool below, Span<double> firstCrossing, double step)
    {
        var width = Vector<double>.Count;
        var limits = new Vector<double>(limit);
        var steps = new Vector<double>(step);
        var unmarked = new Vector<double>(Unmarked);
        var lanes = Vector<long>.Zero;
        var j = 0;
        for (; j <= scores.Length - width; j += width)
        {
            var score = new Vector<double>(scores[j..]);
            var beyond = below ? Vector.LessThan(score, limits) : Vector.GreaterThan(score, limits);
            lanes -= beyond; // a true lane is all ones, -1
            var first = new Vector<double>(firstCrossing[j..]);
            Vector.ConditionalSelect(beyond & Vector.Equals(first, unmarked), steps, first).CopyTo(firstCrossing[j..]);
        }

        var count = Vector.Sum(lanes);
        for (; j < scores.Length; j++)
        {
            if (below ? scores[j] < limit : scores[j] > limit)
            {
                count++;
                if (firstCrossing[j] == Unmarked)
                {
                    firstCrossing[j] = step;
                }
            }
        }

        return count;
    }

    private static WindowPlan? Overlap(RiskWindow window, IReadOnlyList<DateTimeOffset> times)
    {
        var first = -1;
        var last = -1;
        for (var k = 0; k < times.Count; k++)
        {
            if (times[k].AddHours(1) > window.From && times[k] < window.To)
            {
                first = first < 0 ? k : first;
                last = k;
            }
        }

        return first < 0 ? null : new WindowPlan(window, first + 1, last + 1);
    }

    // R quantile type 1 (inverse of the empirical CDF) of values given as counts per value 0, 1, ...: always one of them.
    private static int TypeOne(int[] countOf, int total, double p)
    {
        var rank = Math.Max(0, (int)Math.Ceiling(p * total) - 1);
        var value = 0;
        var atOrBelow = countOf[0];
        while (atOrBelow <= rank)
        {
            value++;
            atOrBelow += countOf[value];
        }

        return value;
    }

    /// <summary>The local clock time on a date as an instant: a time skipped by a DST jump moves forward to the first valid one; a repeated one takes the earlier instant.</summary>
    private static DateTimeOffset LocalInstant(TimeZoneInfo zone, DateOnly date, TimeOnly time)
    {
        var local = date.ToDateTime(time, DateTimeKind.Unspecified);
        for (var i = 0; i < 96 && zone.IsInvalidTime(local); i++)
        {
            local = local.AddMinutes(15);
        }

        var offset = zone.IsAmbiguousTime(local) ? zone.GetAmbiguousTimeOffsets(local).Max() : zone.GetUtcOffset(local);
        return new DateTimeOffset(local, offset);
    }
}
