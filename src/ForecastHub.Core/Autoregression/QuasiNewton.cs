namespace ForecastHub.Core.Autoregression;

/// <summary>BFGS with central-difference gradients and a backtracking (Armijo) line search; deterministic and exception-free.</summary>
internal static class QuasiNewton
{
    private const double GradientStep = 1e-6;

    public static double[] Minimize(Func<double[], double> objective, double[] start, int maxIterations = 500)
    {
        var n = start.Length;
        var x = (double[])start.Clone();
        var f = objective(x);
        if (n == 0 || !double.IsFinite(f))
        {
            return x;
        }

        var g = Gradient(objective, x);
        var h = Identity(n);
        var direction = new double[n];
        var candidate = new double[n];
        for (var iteration = 0; iteration < maxIterations; iteration++)
        {
            if (MaxAbs(g) < 1e-10)
            {
                break;
            }

            var slope = 0.0;
            for (var i = 0; i < n; i++)
            {
                var d = 0.0;
                for (var j = 0; j < n; j++)
                {
                    d -= h[i, j] * g[j];
                }

                direction[i] = d;
                slope += d * g[i];
            }

            if (slope >= 0)
            {
                // Lost descent: restart from steepest descent.
                h = Identity(n);
                for (var i = 0; i < n; i++)
                {
                    direction[i] = -g[i];
                }

                slope = -Dot(g, g);
            }

            var step = 1.0;
            var fNew = double.NaN;
            var accepted = false;
            for (var tries = 0; tries < 60; tries++)
            {
                for (var i = 0; i < n; i++)
                {
                    candidate[i] = x[i] + step * direction[i];
                }

                fNew = objective(candidate);
                if (double.IsFinite(fNew) && fNew <= f + 1e-4 * step * slope)
                {
                    accepted = true;
                    break;
                }

                step /= 2;
            }

            if (!accepted)
            {
                break;
            }

            var s = new double[n];
            for (var i = 0; i < n; i++)
            {
                s[i] = candidate[i] - x[i];
            }

            var gNew = Gradient(objective, candidate);
            var y = new double[n];
            for (var i = 0; i < n; i++)
            {
                y[i] = gNew[i] - g[i];
            }

            var improvement = f - fNew;
            Array.Copy(candidate, x, n);
            f = fNew;
            g = gNew;
            if (improvement <= 1e-16 * (1 + Math.Abs(f)))
            {
                break;
            }

            UpdateInverseHessian(h, s, y);
        }

        return x;
    }

    public static double[] Gradient(Func<double[], double> objective, double[] x)
    {
        var g = new double[x.Length];
        var probe = (double[])x.Clone();
        for (var i = 0; i < x.Length; i++)
        {
            var step = GradientStep * Math.Max(1, Math.Abs(x[i]));
            probe[i] = x[i] + step;
            var up = objective(probe);
            probe[i] = x[i] - step;
            var down = objective(probe);
            probe[i] = x[i];
            g[i] = (up - down) / (2 * step);
        }

        return g;
    }

    private static void UpdateInverseHessian(double[,] h, double[] s, double[] y)
    {
        var sy = Dot(s, y);
        if (!(sy > 1e-18))
        {
            return;
        }

        var n = s.Length;
        var hy = new double[n];
        for (var i = 0; i < n; i++)
        {
            for (var j = 0; j < n; j++)
            {
                hy[i] += h[i, j] * y[j];
            }
        }

        var yhy = Dot(y, hy);
        for (var i = 0; i < n; i++)
        {
            for (var j = 0; j < n; j++)
            {
                h[i, j] += ((sy + yhy) * s[i] * s[j] / sy - hy[i] * s[j] - s[i] * hy[j]) / sy;
            }
        }
    }

    private static double[,] Identity(int n)
    {
        var h = new double[n, n];
        for (var i = 0; i < n; i++)
        {
            h[i, i] = 1;
        }

        return h;
    }

    private static double Dot(double[] a, double[] b)
    {
        var sum = 0.0;
        for (var i = 0; i < a.Length; i++)
        {
            sum += a[i] * b[i];
        }

        return sum;
    }

    private static double MaxAbs(double[] a)
    {
        var max = 0.0;
        foreach (var value in a)
        {
            max = Math.Max(max, Math.Abs(value));
        }

        return max;
    }
}
