using ForecastHub.Core.Grid;

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

    /// <summary>Hourly temperatures in Europe/Berlin from 2015-01-01: annual and diurnal cycles plus an AR(2) anomaly.</summary>
    public static TimeGrid SeasonalHourlyGrid(int hours, int seed)
    {
        var anomaly = Ar(hours, 2, seed);
        var start = new DateTimeOffset(2015, 1, 1, 0, 0, 0, TimeSpan.Zero);
        var readings = new GridReading[hours];
        for (var t = 0; t < hours; t++)
        {
            var day = t / 24.0;
            var value = 10 - 8 * Math.Cos(2 * Math.PI * (day - 15) / 365.25) - 4 * Math.Cos(2 * Math.PI * ((t % 24) - 14) / 24) + 1.5 * anomaly[t];
            readings[t] = new GridReading(start.AddHours(t), value);
        }

        return GridBuilder.Build(readings, new GridOptions(GridCadence.Hourly, "Europe/Berlin"));
    }
}
