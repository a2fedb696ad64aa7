namespace ForecastHub.Core.Modeling;

/// <summary>
/// Puts chosen order statistics of a sample in place without sorting the rest: afterwards
/// values[r] is the value a full ascending sort would put at index r, for every requested r.
/// A multi-target quickselect (three-way partition, median-of-three pivot), so a few quantiles of a
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

            // values[..less] < pivot, values[less..more] == pivot, values[more..] > pivot.
            var less = 0;
            var i = 0;
            var more = values.Length;
            while (i < more)
            {
                var v = values[i];
                if (v < pivot)
                {
                    (values[less], values[i]) = (values[i], values[less]);
                    less++;
                    i++;
                }
                else if (v > pivot)
                {
                    more--;
                    (values[more], values[i]) = (values[i], values[more]);
                }
                else
                {
                    i++;
                }
            }

            var left = 0;
            while (left < ranks.Length && ranks[left] < less)
            {
                left++;
            }

            var right = left;
            while (right < ranks.Length && ranks[right] < more)
            {
                right++;
            }

            Place(values[..less], ranks[..left]);

            // The right part continues in this loop, with its ranks shifted to its own indices.
            var shifted = new int[ranks.Length - right];
            for (var r = 0; r < shifted.Length; r++)
            {
                shifted[r] = ranks[right + r] - more;
            }

            values = values[more..];
            ranks = shifted;
        }
    }

    private static double MedianOfThree(double a, double b, double c) =>
        a < b ? (b < c ? b : a < c ? c : a) : (a < c ? a : b < c ? c : b);
}
