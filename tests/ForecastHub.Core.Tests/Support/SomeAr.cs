namespace ForecastHub.Core.Tests.Support;

/// <summary>Seeded test series.</summary>
public static class SomeAr
{
    /// <summary>Every AR estimator, for theories that must hold for all of them.</summary>
    public static TheoryData<ForecastHub.Core.Autoregression.ArMethod> Methods => new()
    {
        ForecastHub.Core.Autoregression.ArMethod.Burg,
        ForecastHub.Core.Autoregression.ArMethod.YuleWalker,
        ForecastHub.Core.Autoregression.ArMethod.LeastSquares,
        ForecastHub.Core.Autoregression.ArMethod.MaxLikelihood,
    };

    /// <summary>A Gaussian AR(p) with mean <paramref name="mean"/>, after a burn-in of 500 steps.</summary>
    public static double[] ArSeries(int length, double[] phi, double sigma = 1, double mean = 0, int seed = 1)
    {
        var random = new Random(seed);
        var p = phi.Length;
        var burnIn = 500;
        var x = new double[length + burnIn];
        for (var t = 0; t < x.Length; t++)
        {
            var value = sigma * Gaussian(random);
            for (var i = 1; i <= p && t - i >= 0; i++)
            {
                value += phi[i - 1] * x[t - i];
            }

            x[t] = value;
        }

        var result = new double[length];
        for (var t = 0; t < length; t++)
        {
            result[t] = x[t + burnIn] + mean;
        }

        return result;
    }

    /// <summary>A random walk (unit root) of the given length.</summary>
    public static double[] RandomWalk(int length, int seed = 1)
    {
        var random = new Random(seed);
        var x = new double[length];
        for (var t = 1; t < length; t++)
        {
            x[t] = x[t - 1] + Gaussian(random);
        }

        return x;
    }

    public static double[] Constant(int length, double value = 4.2) => Enumerable.Repeat(value, length).ToArray();

    /// <summary>Standard normal by Box-Muller.</summary>
    public static double Gaussian(Random random)
    {
        var u1 = 1.0 - random.NextDouble();
        var u2 = random.NextDouble();
        return Math.Sqrt(-2 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
    }
}
