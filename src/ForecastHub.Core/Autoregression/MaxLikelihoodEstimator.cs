using ForecastHub.Core.Series;
using MathNet.Numerics.LinearAlgebra;

namespace ForecastHub.Core.Autoregression;

/// <summary>
/// Exact Gaussian maximum likelihood for AR(p) with a mean (R arima(order = c(p, 0, 0), method = "ML")).
/// The first p points of each segment enter through the Durbin-Levinson predictors of orders
/// 0..p-1 with their exact prediction variances, later points through the order-p predictor,
/// so each segment contributes its exact log-likelihood; sigma^2 and the mean are profiled out.
/// The optimiser works on the partial autocorrelations r_k = tanh(u_k), which keeps every
/// candidate stationary (R's transform.pars).
/// </summary>
internal static class MaxLikelihoodEstimator
{
    /// <summary>Fits order p; the numerical-Hessian standard errors only when asked; sharedGram (rows t &gt;= its Lags &gt;= p) saves a pass when fitting many orders.</summary>
    public static ArModel Fit(SegmentSummary summary, int order, bool withStandardErrors = true, LaggedGram? sharedGram = null)
    {
        var centered = new LikelihoodData(summary, order, sharedGram);
        var n = summary.Count;
        double[] phi;
        if (order == 0)
        {
            phi = [];
        }
        else
        {
            var start = BurgEstimator.Path(summary, order, BurgVariance.Recursion).Partials;
            var u = new double[order];
            for (var k = 0; k < order; k++)
            {
                u[k] = Math.Atanh(Math.Clamp(start[k], -0.999999, 0.999999));
            }

            var best = QuasiNewton.Minimize(raw => ProfileObjective(centered, n, FromPartials(Tanh(raw))), u);
            phi = FromPartials(Tanh(best)).Coefficients[order];
        }

        var predictors = FromCoefficients(phi)!;
        var terms = Accumulate(centered, predictors);
        var muShift = terms.Cross / terms.OnesSquared;
        var ssq = terms.Squared - terms.Cross * muShift;
        var sigma2 = ssq / n;
        var logLikelihood = -0.5 * (n * Math.Log(2 * Math.PI * sigma2) + n + terms.SumLogVariance);
        var errors = withStandardErrors ? StandardErrors(centered, n, phi, muShift, summary) : new double[order];
        return ArModel.Create(ArMethod.MaxLikelihood, summary, summary.Mean + muShift, (double[])phi.Clone(), errors, sigma2) with
        {
            LogLikelihood = logLikelihood,
        };
    }

    /// <summary>R's objective 0.5 (log(S/n) + sum log F_t / n), with the mean at its GLS value for these coefficients.</summary>
    private static double ProfileObjective(LikelihoodData centered, int n, Predictors predictors)
    {
        var terms = Accumulate(centered, predictors);
        var ssq = terms.Squared - terms.Cross * terms.Cross / terms.OnesSquared;
        return 0.5 * (Math.Log(ssq / n) + terms.SumLogVariance / n);
    }

    /// <summary>The same objective at a given mean shift; +infinity outside the stationary region.</summary>
    private static double Objective(LikelihoodData centered, int n, double[] phi, double muShift)
    {
        var predictors = FromCoefficients(phi);
        if (predictors is null)
        {
            return double.PositiveInfinity;
        }

        var terms = Accumulate(centered, predictors);
        var ssq = terms.Squared - 2 * muShift * terms.Cross + muShift * muShift * terms.OnesSquared;
        return 0.5 * (Math.Log(ssq / n) + terms.SumLogVariance / n);
    }

    /// <summary>Square roots of the diagonal of the inverse numerical Hessian of n * objective in (phi, mean), as R's var.coef; asymptotic Yule-Walker-form errors if that Hessian is not positive definite.</summary>
    private static double[] StandardErrors(LikelihoodData centered, int n, double[] phi, double muShift, SegmentSummary summary)
    {
        var p = phi.Length;
        if (p == 0)
        {
            return [];
        }

        var theta = new double[p + 1];
        Array.Copy(phi, theta, p);
        theta[p] = muShift;
        var scale = Math.Sqrt(Correlation.Autocorrelation.Autocovariance(summary, 0)[0]);
        var steps = new double[p + 1];
        for (var i = 0; i < p; i++)
        {
            steps[i] = 1e-4;
        }

        steps[p] = 1e-4 * scale;
        double F(double[] t) => n * Objective(centered, n, t[..p], t[p]);
        var hessian = Matrix<double>.Build.Dense(p + 1, p + 1);
        var probe = (double[])theta.Clone();
        for (var i = 0; i <= p; i++)
        {
            for (var j = i; j <= p; j++)
            {
                var sum = 0.0;
                foreach (var (si, sj, sign) in new[] { (1, 1, 1), (1, -1, -1), (-1, 1, -1), (-1, -1, 1) })
                {
                    Array.Copy(theta, probe, p + 1);
                    probe[i] += si * steps[i];
                    probe[j] += sj * steps[j];
                    sum += sign * F(probe);
                }

                hessian[i, j] = hessian[j, i] = sum / (4 * steps[i] * steps[j]);
            }
        }

        var errors = new double[p];
        var covariance = hessian.Inverse();
        for (var i = 0; i < p; i++)
        {
            errors[i] = Math.Sqrt(covariance[i, i]);
        }

        if (errors.All(e => double.IsFinite(e) && e > 0))
        {
            return errors;
        }

        var acov = Correlation.Autocorrelation.Autocovariance(summary, p);
        var terms = Accumulate(centered, FromCoefficients(phi)!);
        var sigma2 = (terms.Squared - terms.Cross * muShift) / n;
        return YuleWalkerEstimator.AsymptoticStandardErrors(acov, p, sigma2, n);
    }

    /// <summary>
    /// Weighted sums over all points: the first p points of each segment one by one (their
    /// predictors change with t), rows t &gt;= p through the lagged moment matrix, so an evaluation
    /// costs O(p^2) per segment instead of O(n p).
    /// </summary>
    private static Terms Accumulate(LikelihoodData data, Predictors predictors)
    {
        var p = predictors.Order;
        var squared = 0.0;
        var cross = 0.0;
        var onesSquared = 0.0;
        var sumLog = 0.0;
        foreach (var x in data.Centered)
        {
            for (var t = 0; t < Math.Min(p, x.Length); t++)
            {
                var coefficients = predictors.Coefficients[t];
                var a = x[t];
                for (var i = 1; i <= t; i++)
                {
                    a -= coefficients[i - 1] * x[t - i];
                }

                var b = predictors.OneMinusSum[t];
                var weight = predictors.InverseVariance[t];
                squared += a * a * weight;
                cross += a * b * weight;
                onesSquared += b * b * weight;
                sumLog += predictors.LogVariance[t];
            }
        }

        // Rows t >= p: a_t = c'z_t with c = (1, -phi), z_t = (x_t, ..., x_{t-p}); unit weight, log v_p = 0.
        var phi = predictors.Coefficients[p];
        var moments = data.Moments;
        var aSquared = 0.0;
        var aSum = 0.0;
        for (var i = 0; i <= p; i++)
        {
            var ci = i == 0 ? 1 : -phi[i - 1];
            var row = 0.0;
            for (var j = 0; j <= p; j++)
            {
                row += moments[i, j] * (j == 0 ? 1 : -phi[j - 1]);
            }

            aSquared += ci * row;
            aSum += ci * data.Sums[i];
        }

        var bMain = predictors.OneMinusSum[p];
        squared += aSquared;
        cross += aSum * bMain;
        onesSquared += bMain * bMain * data.Rows;
        return new Terms(squared, cross, onesSquared, sumLog);
    }

    /// <summary>Centered segments and, for rows t &gt;= p of every segment, the moments of z_t = (x_t, x_{t-1}, ..., x_{t-p}).</summary>
    private sealed class LikelihoodData
    {
        public LikelihoodData(SegmentSummary summary, int order, LaggedGram? sharedGram)
        {
            Centered = summary.Centered();
            var gram = sharedGram is null ? LaggedGram.Build(summary, order, order) : sharedGram.Narrow(summary, order);
            Rows = gram.Rows;
            Moments = new double[order + 1, order + 1];
            Sums = new double[order + 1];
            Moments[0, 0] = gram.SumSquaresY;
            Sums[0] = gram.CrossY[0];
            for (var i = 1; i <= order; i++)
            {
                Moments[0, i] = Moments[i, 0] = gram.CrossY[i];
                Sums[i] = gram.Gram[0, i];
                for (var j = 1; j <= order; j++)
                {
                    Moments[i, j] = gram.Gram[i, j];
                }
            }
        }

        public double[][] Centered { get; }

        /// <summary>sum_t z_{t,i} z_{t,j} over rows t &gt;= p.</summary>
        public double[,] Moments { get; }

        /// <summary>sum_t z_{t,i} over rows t &gt;= p.</summary>
        public double[] Sums { get; }

        public int Rows { get; }
    }

    private static double[] Tanh(double[] raw)
    {
        var r = new double[raw.Length];
        for (var i = 0; i < raw.Length; i++)
        {
            r[i] = Math.Tanh(raw[i]);
        }

        return r;
    }

    /// <summary>Levinson step-up from partial autocorrelations (all |r_k| &lt; 1) to the predictors of orders 0..p.</summary>
    private static Predictors FromPartials(double[] partials)
    {
        var p = partials.Length;
        var coefficients = new double[p + 1][];
        coefficients[0] = [];
        for (var k = 1; k <= p; k++)
        {
            coefficients[k] = Correlation.DurbinLevinson.StepUp(coefficients[k - 1], partials[k - 1]);
        }

        return new Predictors(coefficients, partials);
    }

    /// <summary>Levinson step-down from phi to the predictors of orders 0..p; null when phi is not stationary.</summary>
    private static Predictors? FromCoefficients(double[] phi)
    {
        var p = phi.Length;
        var coefficients = new double[p + 1][];
        var partials = new double[p];
        coefficients[p] = phi;
        for (var k = p; k >= 1; k--)
        {
            var current = coefficients[k];
            var r = current[k - 1];
            if (!(Math.Abs(r) < 1))
            {
                return null;
            }

            partials[k - 1] = r;
            var previous = new double[k - 1];
            for (var j = 1; j < k; j++)
            {
                previous[j - 1] = (current[j - 1] + r * current[k - j - 1]) / (1 - r * r);
            }

            coefficients[k - 1] = previous;
        }

        return new Predictors(coefficients, partials);
    }

    private readonly record struct Terms(double Squared, double Cross, double OnesSquared, double SumLogVariance);

    /// <summary>Order-k predictors with unit-innovation prediction variances v_k = prod_{j&gt;k} 1/(1 - r_j^2).</summary>
    private sealed class Predictors
    {
        public Predictors(double[][] coefficients, double[] partials)
        {
            Coefficients = coefficients;
            var p = partials.Length;
            Order = p;
            LogVariance = new double[p + 1];
            InverseVariance = new double[p + 1];
            OneMinusSum = new double[p + 1];
            for (var k = p; k >= 0; k--)
            {
                LogVariance[k] = k == p ? 0 : LogVariance[k + 1] - Math.Log(1 - partials[k] * partials[k]);
                InverseVariance[k] = Math.Exp(-LogVariance[k]);
                var sum = 0.0;
                foreach (var c in coefficients[k])
                {
                    sum += c;
                }

                OneMinusSum[k] = 1 - sum;
            }
        }

        public int Order { get; }

        public double[][] Coefficients { get; }

        public double[] LogVariance { get; }

        public double[] InverseVariance { get; }

        public double[] OneMinusSum { get; }
    }
}
