using ForecastHub.Core.Forecasting;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;

namespace ForecastHub.Core.Risk;

/// <summary>A window as horizons (1-based, counted from the newest value) of the forecast's steps.</summary>
public sealed record WindowPlan(RiskWindow Window, int FirstHorizon, int LastHorizon);

/// <summary>
/// The risk windows of a site and the chance of crossing a threshold in each (DESIGN section 10).
/// Hourly sites: <c>night</c> (the night holding <c>now</c> until its end, else the coming one) and
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
    /// Per-step probabilities and window risks from one set of seeded paths (window chance = share of
    /// paths with at least one step beyond; a one-step window uses its step's exact probability).
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
        var risks = new List<WindowRisk>();
        var n = paths.Count;
        foreach (var plan in windows)
        {
            var first = plan.FirstHorizon - 1;
            var length = plan.LastHorizon - plan.FirstHorizon + 1;

            // The window's values per path, by the copula mapping of each step's score.
            var min = new double[n];
            var max = new double[n];
            Array.Fill(min, double.PositiveInfinity);
            Array.Fill(max, double.NegativeInfinity);
            for (var k = first; k < first + length; k++)
            {
                var row = paths.Scores.AsSpan(k * paths.Stride, n);
                var step = steps[k];
                for (var j = 0; j < n; j++)
                {
                    var value = step.ValueAtScore(row[j]);
                    min[j] = Math.Min(min[j], value);
                    max[j] = Math.Max(max[j], value);
                }
            }

            foreach (var threshold in thresholds)
            {
                var below = threshold.Direction == ThresholdDirection.Below;

                // Crossing compares scores with each step's score of the threshold: exact, since Q is increasing.
                var limits = new double[length];
                for (var i = 0; i < length; i++)
                {
                    limits[i] = steps[first + i].ScoreOf(threshold.ValueC);
                }

                var firstCross = new int[n];
                Array.Fill(firstCross, -1);
                var beyond = 0L;

                // Step by step over each step's row of paths, so memory is read in order.
                for (var i = 0; i < length; i++)
                {
                    var row = paths.Scores.AsSpan((first + i) * paths.Stride, n);
                    var limit = limits[i];
                    for (var j = 0; j < n; j++)
                    {
                        if (below ? row[j] < limit : row[j] > limit)
                        {
                            beyond++;
                            if (firstCross[j] < 0)
                            {
                                firstCross[j] = i;
                            }
                        }
                    }
                }

                var crossing = firstCross.Count(c => c >= 0);

                var probability = length == 1 ? steps[first].Probability(threshold.Direction, threshold.ValueC) : crossing / (double)n;
                CrossingTimes? firstCrossing = null;
                if (length == 1 && probability > 0)
                {
                    firstCrossing = new CrossingTimes(times[first], times[first], times[first]);
                }
                else if (crossing > 0)
                {
                    var sorted = firstCross.Where(c => c >= 0).Order().ToArray();
                    firstCrossing = new CrossingTimes(times[first + TypeOne(sorted, 0.5)], times[first + TypeOne(sorted, 0.1)], times[first + TypeOne(sorted, 0.9)]);
                }

                double? hours = stepHours > 0 ? beyond * stepHours / n : null;
                risks.Add(new WindowRisk(threshold, plan.Window, probability, firstCrossing, hours, Describe(below ? min : max, levels)));
            }
        }

        return risks;
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

    // R quantile type 1 (inverse of the empirical CDF) of sorted values: always one of them.
    private static int TypeOne(int[] sorted, double p) => sorted[Math.Max(0, (int)Math.Ceiling(p * sorted.Length) - 1)];

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

    private static DistributionSummary Describe(double[] values, IReadOnlyList<double> levels)
    {
        var sorted = values.Order().ToArray();
        return new DistributionSummary(
            values.Average(),
            [.. levels.Select(l => new PredictionInterval(l, Calibration.SortedQuantile(sorted, (1 - l) / 2), Calibration.SortedQuantile(sorted, (1 + l) / 2)))]);
    }
}
