namespace ForecastHub.Benchmarks;

/// <summary>Seeded synthetic inputs for benchmarks.</summary>
internal static class Series
{
    /// <summary>A stationary AR(order) with geometrically decaying positive coefficients summing to 0.9.</summary>
    public static double[] Ar(int length, int order, int seed)
    {
        var phi = new double[order];
        var total = 0.0;
        for (var i = 0; i < order; i++)
        {
            phi[i] = Math.Pow(0.7, i);
            total += phi[i];
        }

        for (var i = 0; i < order; i++)
        {
            phi[i] *= 0.9 / total;
        }

        var random = new Random(seed);
        var x = new double[length + 1000];
        for (var t = 0; t < x.Length; t++)
        {
            var u1 = 1.0 - random.NextDouble();
            var value = Math.Sqrt(-2 * Math.Log(u1)) * Math.Cos(2 * Math.PI * random.NextDouble());
            for (var i = 1; i <= order && t - i >= 0; i++)
            {
                value += phi[i - 1] * x[t - i];
            }

            x[t] = value;
        }

        return x[1000..];
    }
}
