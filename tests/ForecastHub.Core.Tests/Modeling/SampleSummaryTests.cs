using ForecastHub.Core.Modeling;
using MathNet.Numerics.Distributions;

namespace ForecastHub.Core.Tests.Modeling;

/// <summary>The shortcuts behind the Monte Carlo summaries give exactly what the plain computations give.</summary>
public sealed class SampleSummaryTests
{
    public static TheoryData<int, int, int> Samples => new()
    {
        { 2000, 1, 0 },     // continuous values, the size the forecasts simulate
        { 2000, 2, 7 },     // many ties: values rounded to a few levels
        { 2000, 7, 1 },     // every value the same
        { 25, 3, 0 },
        { 24, 4, 0 },
        { 3, 5, 0 },
        { 1, 6, 0 },
    };

    [Theory]
    [MemberData(nameof(Samples))]
    public void PlacedOrderStatisticsEqualAFullSort(int n, int seed, int levels)
    {
        var random = new Random(seed);
        var values = Enumerable.Range(0, n).Select(_ => levels > 0 ? random.Next(levels) - 3.0 : Normal.Sample(random, 0, 1)).ToArray();
        var sorted = values.Order().ToArray();
        foreach (var ranks in new[] { new[] { 0 }, new[] { n - 1 }, new[] { 0, n - 1 }, Enumerable.Range(0, n).Where(r => r % 7 == 3).ToArray(), new[] { n / 40, n / 40 + 1, n / 10, n / 10 + 1, n * 9 / 10, Math.Min(n - 1, n * 9 / 10 + 1) } })
        {
            var placed = values.ToArray();
            var distinct = ranks.Where(r => r < n).Distinct().Order().ToArray();
            OrderStatistics.Place(placed, distinct);
            Assert.All(distinct, r => Assert.Equal(sorted[r], placed[r]));
            Assert.Equal(sorted, placed.Order().ToArray()); // nothing lost or duplicated
        }
    }

    [Fact]
    public void PlacedOrderStatisticsOfSortedAndReversedSamplesEqualTheirPositions()
    {
        var ascending = Enumerable.Range(0, 2000).Select(i => i * 0.5).ToArray();
        int[] ranks = [0, 49, 50, 199, 200, 1799, 1800, 1949, 1950, 1999];
        foreach (var values in new[] { ascending.ToArray(), ascending.Reverse().ToArray() })
        {
            OrderStatistics.Place(values, ranks);
            Assert.All(ranks, r => Assert.Equal(r * 0.5, values[r]));
        }
    }

    [Fact]
    public void SampleSummaryEqualsTypeSevenQuantilesOfTheSortedSample()
    {
        var random = new Random(11);
        var values = Enumerable.Range(0, 2000).Select(_ => Normal.Sample(random, 5, 2)).ToArray();
        var sorted = values.Order().ToArray();

        var summary = DistributionSummary.OfSample(values, [0.8, 0.95]);

        Assert.Equal(values.Average(), summary.Mean);
        foreach (var interval in summary.Intervals)
        {
            Assert.Equal(OrderStatistics.SortedQuantile(sorted, (1 - interval.Level) / 2), interval.Lower);
            Assert.Equal(OrderStatistics.SortedQuantile(sorted, (1 + interval.Level) / 2), interval.Upper);
        }
    }

    [Fact]
    public void CalibratedQuantileIsTheTablesPiecewiseLinearFunctionOfTheScore()
    {
        var scores = Calibration.Probabilities.Select(p => Normal.InvCDF(0, 1, p)).ToArray();
        var row = scores.Select((z, i) => (1.1 * z) + (0.01 * i * i)).ToArray();

        // The plain walk over the table's segments: the first segment whose upper score reaches z, the end ones extended.
        double Plain(double z)
        {
            var i = 1;
            while (i < scores.Length - 1 && scores[i] < z)
            {
                i++;
            }

            return row[i - 1] + ((z - scores[i - 1]) / (scores[i] - scores[i - 1]) * (row[i] - row[i - 1]));
        }

        var probes = scores.Concat(Enumerable.Range(-4000, 8001).Select(k => k / 1000.0)).Concat([-40.0, 40.0, double.NaN]);
        foreach (var z in probes)
        {
            Assert.Equal(Plain(z), Calibration.QuantileAtScore(row, z));
        }

        Assert.All(scores.Skip(1).SkipLast(1).Select((z, i) => (z, i + 1)), p => Assert.Equal(row[p.Item2], Calibration.QuantileAtScore(row, p.z), 12));
    }
}
