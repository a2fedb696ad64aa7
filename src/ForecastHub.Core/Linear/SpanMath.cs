using System.Numerics;
using System.Runtime.InteropServices;

namespace ForecastHub.Core.Linear;

/// <summary>Vectorised dot product and axpy for recursions, lagged sums and Householder steps.</summary>
internal static class SpanMath
{
    /// <summary>sum a_i b_i over a's length; four independent vector lanes break the add latency chain on long spans.</summary>
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
            var acc2 = Vector<double>.Zero;
            var acc3 = Vector<double>.Zero;
            var v = 0;
            for (; v + 3 < va.Length; v += 4)
            {
                acc0 += va[v] * vb[v];
                acc1 += va[v + 1] * vb[v + 1];
                acc2 += va[v + 2] * vb[v + 2];
                acc3 += va[v + 3] * vb[v + 3];
            }

            for (; v < va.Length; v++)
            {
                acc0 += va[v] * vb[v];
            }

            sum = Vector.Sum((acc0 + acc1) + (acc2 + acc3));
            i = va.Length * Vector<double>.Count;
        }

        for (; i < n; i++)
        {
            sum += a[i] * b[i];
        }

        return sum;
    }

    /// <summary>y += alpha x over x's length.</summary>
    public static void Axpy(double alpha, ReadOnlySpan<double> x, Span<double> y)
    {
        var n = x.Length;
        var i = 0;
        if (Vector.IsHardwareAccelerated && n >= Vector<double>.Count)
        {
            var vx = MemoryMarshal.Cast<double, Vector<double>>(x);
            var vy = MemoryMarshal.Cast<double, Vector<double>>(y[..n]);
            var a = new Vector<double>(alpha);
            for (var v = 0; v < vx.Length; v++)
            {
                vy[v] += a * vx[v];
            }

            i = vx.Length * Vector<double>.Count;
        }

        for (; i < n; i++)
        {
            y[i] += alpha * x[i];
        }
    }

    /// <summary>
    /// target_i += sum_c alpha_c columns_c[offset + i], the terms added in column order: the same operations on each
    /// element as one <see cref="Axpy"/> per column, so the same result bit for bit, in one pass over the memory.
    /// </summary>
    public static void AddCombination(ReadOnlySpan<double> alphas, ReadOnlySpan<double[]> columns, int offset, Span<double> target)
    {
        var n = target.Length;
        var i = 0;
        if (Vector.IsHardwareAccelerated && n >= Vector<double>.Count)
        {
            var blocks = n / Vector<double>.Count;
            var vt = MemoryMarshal.Cast<double, Vector<double>>(target)[..blocks];
            for (var v = 0; v < blocks; v++)
            {
                var sum = vt[v];
                var at = offset + (v * Vector<double>.Count);
                for (var c = 0; c < alphas.Length; c++)
                {
                    sum += new Vector<double>(alphas[c]) * new Vector<double>(columns[c], at);
                }

                vt[v] = sum;
            }

            i = blocks * Vector<double>.Count;
        }

        for (; i < n; i++)
        {
            var sum = target[i];
            for (var c = 0; c < alphas.Length; c++)
            {
                sum += alphas[c] * columns[c][offset + i];
            }

            target[i] = sum;
        }
    }
}
