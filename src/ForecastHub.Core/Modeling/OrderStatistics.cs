namespace ForecastHub.Core.Modeling;

/// <summary>
/// Puts chosen order statistics of a sample in place without sorting the rest: afterwards
/// values[r] is the value a full ascending sort would put at index r, for every requested r.
/// A multi-target quickselect (Hoare partition, median-of-three pivot), so a few quantiles of a
/// simulated sample cost a few passes instead of a sort.
/// </summary>
internal static class OrderStatistics
{
    private const int SortBelow = 24;

    /// <param name="ranks">Ascending indices into <paramref name="values"/>.</param>
    public static void Place(Span<double> values, ReadOnlySpan<int> ranks)
    {
        while (ranks.Length > 0)
        {
            if (values.Length <= SortBelow)
            {
                values.Sort();
                return;
            }

            var pivot = MedianOfThree(values[0], values[values.Length / 2], values[^1]);

            // Hoare's partition swaps only misplaced pairs: afterwards values[..split] <= pivot <= values[split..].
            // The pivot is the median of three values including the last, so both parts are non-empty.
            var i = -1;
            var j = values.Length;
            while (true)
            {
                do
                {
                    i++;
                }
                while (values[i] < pivot);

                do
                {
                    j--;
                }
                while (values[j] > pivot);

                if (i >= j)
                {
                    break;
                }

                (values[i], values[j]) = (values[j], values[i]);
            }

            var split = j + 1;
            var left = 0;
            while (left < ranks.Length && ranks[left] < split)
            {
                left++;
            }

            Place(values[..split], ranks[..left]);

            // The right part continues in this loop, with its ranks shifted to its own indices.
            var shifted = new int[ranks.Length - left];
            for (var r = 0; r < shifted.Length; r++)
            {
                shifted[r] = ranks[left + r] - split;
            }

            values = values[split..];
            ranks = shifted;
        }
    }

    /// <summary>R quantile type 7 of the sample at each probability. Type 7 reads the two order statistics around
    /// (n - 1) p: only those are put in place, not the whole sample sorted, and <paramref name="values"/> is reordered.</summary>
    public static double[] TypeSevenQuantiles(Span<double> values, IReadOnlyList<double> probabilities)
    {
        var count = values.Length;
        var ranks = probabilities.Select(p => TypeSevenPosition(count, p)).SelectMany(q => new[] { q.Lo, q.Hi })
            .Where(r => r >= 0).Distinct().Order().ToArray();
        Place(values, ranks);
        var quantiles = new double[probabilities.Count];
        for (var i = 0; i < quantiles.Length; i++)
        {
            quantiles[i] = SortedQuantile(values, probabilities[i]);
        }

        return quantiles;
    }

    /// <summary>R quantile type 7 of sorted values (or of values whose order statistics at its two ranks are in place).</summary>
    public static double SortedQuantile(ReadOnlySpan<double> sorted, double p)
    {
        if (sorted.Length == 0)
        {
            return double.NaN;
        }

        var (lo, hi, weight) = TypeSevenPosition(sorted.Length, p);
        return sorted[lo] + weight * (sorted[hi] - sorted[lo]);
    }

    /// <summary>Type 7 interpolates between the order statistics lo = floor((n - 1) p) and min(lo + 1, n - 1).</summary>
    private static (int Lo, int Hi, double Weight) TypeSevenPosition(int count, double p)
    {
        var position = (count - 1) * p;
        var lo = (int)Math.Floor(position);
        return (lo, Math.Min(lo + 1, count - 1), position - lo);
    }

    private static double MedianOfThree(double a, double b, double c) =>
        a < b ? (b < c ? b : a < c ? c : a) : (a < c ? a : b < c ? c : b);
}
