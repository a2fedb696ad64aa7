namespace ForecastHub.Core.Tests.Support;

/// <summary>Assertions with a stated tolerance: |actual - expected| &lt;= tolerance * max(1, |expected|).</summary>
public static class Close
{
    public static void Equal(double expected, double actual, double tolerance, string what)
    {
        var limit = tolerance * Math.Max(1, Math.Abs(expected));
        Assert.True(
            Math.Abs(actual - expected) <= limit,
            $"{what}: expected {expected:R}, got {actual:R} (difference {actual - expected:G3}, allowed {limit:G3})");
    }

    public static void All(IReadOnlyList<double> expected, IReadOnlyList<double> actual, double tolerance, string what)
    {
        Assert.True(expected.Count == actual.Count, $"{what}: expected {expected.Count} values, got {actual.Count}");
        for (var i = 0; i < expected.Count; i++)
        {
            Equal(expected[i], actual[i], tolerance, $"{what}[{i}]");
        }
    }
}
