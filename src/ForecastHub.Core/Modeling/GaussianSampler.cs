namespace ForecastHub.Core.Modeling;

/// <summary>Seeded standard normal draws: xoshiro256** (Blackman and Vigna 2018) seeded by splitmix64, and the
/// Marsaglia polar method. Reproducible across platforms for a given seed.</summary>
internal sealed class GaussianSampler
{
    private ulong s0, s1, s2, s3;
    private double spare;
    private bool hasSpare;

    public GaussianSampler(int seed)
    {
        var x = (ulong)(uint)seed;
        s0 = SplitMix(ref x);
        s1 = SplitMix(ref x);
        s2 = SplitMix(ref x);
        s3 = SplitMix(ref x);
    }

    public double Next()
    {
        if (hasSpare)
        {
            hasSpare = false;
            return spare;
        }

        double u, v, s;
        do
        {
            u = 2 * Uniform() - 1;
            v = 2 * Uniform() - 1;
            s = u * u + v * v;
        }
        while (s >= 1 || s == 0);

        var f = Math.Sqrt(-2 * Math.Log(s) / s);
        spare = v * f;
        hasSpare = true;
        return u * f;
    }

    private double Uniform() => (NextBits() >> 11) * (1.0 / (1UL << 53));

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
