using System.Numerics;
using System.Runtime.InteropServices;

namespace ForecastHub.Core.Linear;

/// <summary>Vectorised dot product for recursions and lagged sums (independent lanes break the add latency chain).</summary>
internal static class SpanMath
{
    public static double Dot(ReadOnlySpan<double> a, ReadOnlySpan<double> b)
    {
        var n = a.Length;
        var i = 0;
        var sum = 0.0;
        if (Vector.IsHardwareAccelerated && n >= 2 * Vector<double>.Count)
        {
            var va = MemoryMarshal.Cast<double, Vector<double>>(a);
            var vb = MemoryMarshal.Cast<double, Vector<double>>(b[..n]);
            var acc0 = Vector<double>.Zero;
            var acc1 = Vector<double>.Zero;
            var v = 0;
            for (; v + 1 < va.Length; v += 2)
            {
                acc0 += va[v] * vb[v];
                acc1 += va[v + 1] * vb[v + 1];
            }

            if (v < va.Length)
            {
                acc0 += va[v] * vb[v];
            }

            sum = Vector.Sum(acc0 + acc1);
            i = va.Length * Vector<double>.Count;
        }

        for (; i < n; i++)
        {
            sum += a[i] * b[i];
        }

        return sum;
    }
}
