using ForecastHub.Core.Linear;

namespace ForecastHub.Core.Tests.Linear;

public sealed class SpanMathTests
{
    [Theory]
    [InlineData(0, 1, 0)]
    [InlineData(3, 1, 0)]
    [InlineData(11, 87, 5)]
    [InlineData(9, 1000, 13)]
    public void ACombinationInOnePassEqualsOneAxpyPerColumnBitForBit(int columnCount, int length, int offset)
    {
        var random = new Random(columnCount + length);
        var columns = Enumerable.Range(0, columnCount)
            .Select(_ => Enumerable.Range(0, offset + length + 7).Select(_ => random.NextDouble() * 40 - 20).ToArray()).ToArray();
        var alphas = Enumerable.Range(0, columnCount).Select(_ => random.NextDouble() * 6 - 3).ToArray();
        var start = Enumerable.Range(0, length).Select(_ => random.NextDouble() * 10).ToArray();

        var expected = (double[])start.Clone();
        for (var c = 0; c < columnCount; c++)
        {
            SpanMath.Axpy(alphas[c], columns[c].AsSpan(offset, length), expected);
        }

        var combined = (double[])start.Clone();
        SpanMath.AddCombination(alphas, columns, offset, combined);

        Assert.Equal(expected.Select(BitConverter.DoubleToInt64Bits), combined.Select(BitConverter.DoubleToInt64Bits));
    }
}
