using System.Runtime.CompilerServices;

namespace ForecastHub.Core.Modeling;

/// <summary>
/// Seeded standard normal draws: xoshiro256** bits (Blackman and Vigna 2018) seeded by splitmix64,
/// turned into normals by the 128-layer ziggurat (Marsaglia and Tsang 2000, in Doornik's 2005
/// ZIGNOR form, which avoids the correlated-bits flaw of the original). Reproducible for a seed.
/// </summary>
internal sealed class GaussianSampler
{
    private const int Layers = 128;
    private const double TailStart = 3.442619855899;
    private const double LayerArea = 9.91256303526217e-3;
    private static readonly double[] X = LayerEdges();
    private static readonly double[] Ratio = Enumerable.Range(0, Layers).Select(i => X[i + 1] / X[i]).ToArray();

    private ulong s0, s1, s2, s3;

    public GaussianSampler(int seed)
    {
        var x = (ulong)(uint)seed;
        s0 = SplitMix(ref x);
        s1 = SplitMix(ref x);
        s2 = SplitMix(ref x);
        s3 = SplitMix(ref x);
    }

    /// <summary>The next draw; the common case (about 99 % of draws) is inlined into the caller's loop.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double Next()
    {
        var bits = NextBits();
        var u = Centred(bits);
        var i = (int)(bits & (Layers - 1));
        return Math.Abs(u) < Ratio[i] ? u * X[i] : NextSlow(u, i);
    }

    /// <summary>The rest of a draw whose first try fell outside its layer's rectangle: the tail, the wedge test, then fresh tries.</summary>
    private double NextSlow(double u, int i)
    {
        while (true)
        {
            if (i == 0)
            {
                return Tail(u < 0);
            }

            var x = u * X[i];
            var f0 = Math.Exp(-0.5 * ((X[i] * X[i]) - (x * x)));
            var f1 = Math.Exp(-0.5 * ((X[i + 1] * X[i + 1]) - (x * x)));
            if (f1 + (Uniform() * (f0 - f1)) < 1.0)
            {
                return x;
            }

            var bits = NextBits();
            u = Centred(bits);
            i = (int)(bits & (Layers - 1));
            if (Math.Abs(u) < Ratio[i])
            {
                return u * X[i];
            }
        }
    }

    // A uniform on (-1, 1) from the top 53 bits; through long, since they fit, which converts faster than ulong.
    private static double Centred(ulong bits) => (2.0 * (long)(bits >> 11) * (1.0 / (1UL << 53))) - 1;

    private double Tail(bool negative)
    {
        double x, y;
        do
        {
            x = Math.Log(1 - Uniform()) / TailStart;
            y = Math.Log(1 - Uniform());
        }
        while (-2 * y < x * x);

        return negative ? x - TailStart : TailStart - x;
    }

    private static double[] LayerEdges()
    {
        var x = new double[Layers + 1];
        var f = Math.Exp(-0.5 * TailStart * TailStart);
        x[0] = LayerArea / f;
        x[1] = TailStart;
        x[Layers] = 0;
        for (var i = 2; i < Layers; i++)
        {
            x[i] = Math.Sqrt(-2 * Math.Log((LayerArea / x[i - 1]) + f));
            f = Math.Exp(-0.5 * x[i] * x[i]);
        }

        return x;
    }

    private double Uniform() => (long)(NextBits() >> 11) * (1.0 / (1UL << 53));

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private ulong NextBits()
    {
        var result = ulong.RotateLeft(s1 * 5, 7) * 9;
        var t = s1 << 17;
        s2 ^= s0;
        s3 ^= s1;
        s1 ^= s2;
        s0 ^= s3;
        s2 ^= t;
        s3 = ulong.RotateLeft(s3, 45);
        return result;
    }

    private static ulong SplitMix(ref ulong x)
    {
        var z = x += 0x9E3779B97F4A7C15UL;
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
        return z ^ (z >> 31);
    }
}
