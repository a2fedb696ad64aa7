using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Climatology;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Linear;

namespace ForecastHub.Core.Modeling;

/// <summary>
/// AR coefficients that move with the season (daily sites with annual harmonics): for the chosen order p,
/// phi_i(t) = Constant_i + Cos_i cos(theta_t) + Sin_i sin(theta_t) for lags i &lt;= <see cref="Lags"/> (the
/// others constant), theta_t the annual angle 2 pi doy / 365.25 of the step being predicted. Fitted by
/// least squares on the anomalies minus the AR mean, rows t &gt;= p of each segment; the constant AR(p)
/// by least squares on the same rows is its comparison: <see cref="Used"/> when
/// AIC = m log(RSS / m) + 2k is lower for the seasonal form (k = p + 2 Lags against p) and its
/// coefficients are stationary all year round. Forecasts use the coefficients of their first step
/// (they change by about 1 % of their swing a day).
/// </summary>
public sealed record SeasonalArTerms(
    bool Used,
    int Order,
    int Lags,
    IReadOnlyList<double> Constant,
    IReadOnlyList<double> Cos,
    IReadOnlyList<double> Sin,
    double InnovationVariance,
    int Rows,
    double AicConstant,
    double AicSeasonal,
    string Decision)
{
    /// <summary>Seasonal terms on lags 1..2 only: the first lags carry the persistence (common practice, no source).</summary>
    public const int MaxLags = 2;

    private const int StationarityChecks = 24;

    /// <summary>phi_1..phi_p at the annual angle of <paramref name="time"/>.</summary>
    public double[] CoefficientsAt(HarmonicDesign design, DateTimeOffset time)
    {
        ArgumentNullException.ThrowIfNull(design);
        var (cos, sin) = Angle(design, time);
        return At(cos, sin);
    }

    /// <summary>The AR model a forecast from just before <paramref name="time"/> uses: this fit's coefficients there, or
    /// <paramref name="ar"/> itself when the seasonal form is not used.</summary>
    public ArModel Frozen(ArModel ar, HarmonicDesign design, DateTimeOffset time)
    {
        ArgumentNullException.ThrowIfNull(ar);
        return Used ? ar with { Coefficients = CoefficientsAt(design, time), InnovationVariance = InnovationVariance, Intercept = 0 } : ar;
    }

    private double[] At(double cos, double sin)
    {
        var phi = Constant.ToArray();
        for (var i = 0; i < Lags; i++)
        {
            phi[i] += Cos[i] * cos + Sin[i] * sin;
        }

        return phi;
    }

    private static (double Cos, double Sin) Angle(HarmonicDesign design, DateTimeOffset time)
    {
        var cos = design.Evaluate([time], [0, 1, .. new double[design.Columns - 2]])[0];
        var sin = design.Evaluate([time], [0, 0, 1, .. new double[design.Columns - 3]])[0];
        return (cos, sin);
    }

    /// <summary>Fits both forms on the window's anomalies; null when the design has no annual terms, the site is not
    /// daily, or the order is 0. <paramref name="x"/> holds the design columns at the window's times (column 1 and 2
    /// are the first annual cos and sin).</summary>
    internal static SeasonalArTerms? Fit(SeriesWindow window, double[] anomalies, ArModel ar, HarmonicDesign design, double[][]? x)
    {
        var p = ar.Order;
        if (x is null || design.AnnualHarmonics < 1 || design.Cadence != GridCadence.Daily || p < 1)
        {
            return null;
        }

        var q = Math.Min(p, MaxLags);
        var k = p + (2 * q);
        var qr = new TallSkinnyQr(k + 1);
        var mean = ar.Mean;
        foreach (var (start, length) in window.Segments)
        {
            for (var t = start + p; t < start + length; t += TallSkinnyQr.BlockRows)
            {
                var rows = Math.Min(TallSkinnyQr.BlockRows, start + length - t);
                for (var i = 1; i <= p; i++)
                {
                    var lagged = qr.Block(i - 1);
                    for (var r = 0; r < rows; r++)
                    {
                        lagged[r] = anomalies[t + r - i] - mean;
                    }

                    if (i <= q)
                    {
                        var c = qr.Block(p + (2 * (i - 1)));
                        var s = qr.Block(p + (2 * (i - 1)) + 1);
                        for (var r = 0; r < rows; r++)
                        {
                            c[r] = lagged[r] * x[1][t + r];
                            s[r] = lagged[r] * x[2][t + r];
                        }
                    }
                }

                var target = qr.Block(k);
                for (var r = 0; r < rows; r++)
                {
                    target[r] = anomalies[t + r] - mean;
                }

                qr.Commit(rows);
            }
        }

        var m = qr.Rows;
        if (m < 10 * (k + 1))
        {
            return null;
        }

        var triangle = qr.Triangle();
        var rssSeasonal = triangle[k, k] * triangle[k, k];

        // The constant AR(p) on the same rows is the nested model of the first p columns: its RSS adds the
        // squared entries of Q'y beyond them.
        var rssConstant = rssSeasonal;
        for (var j = p; j < k; j++)
        {
            rssConstant += triangle[j, k] * triangle[j, k];
        }

        var aicConstant = (m * Math.Log(rssConstant / m)) + (2.0 * p);
        var aicSeasonal = (m * Math.Log(rssSeasonal / m)) + (2.0 * k);
        double[] beta;
        try
        {
            beta = Climatology.HarmonicRegression.Solve(qr).Coefficients;
        }
        catch (Series.SeriesException)
        {
            return null;
        }

        var terms = new SeasonalArTerms(
            false,
            p,
            q,
            beta[..p],
            [.. Enumerable.Range(0, q).Select(i => beta[p + (2 * i)])],
            [.. Enumerable.Range(0, q).Select(i => beta[p + (2 * i) + 1])],
            rssSeasonal / m,
            m,
            aicConstant,
            aicSeasonal,
            string.Empty);
        if (!(aicSeasonal < aicConstant))
        {
            return terms with { Decision = "constant: the seasonal form does not lower the AIC" };
        }

        for (var j = 0; j < StationarityChecks; j++)
        {
            var angle = 2 * Math.PI * j / StationarityChecks;
            if (CharacteristicRoots.Classify(CharacteristicRoots.Of(terms.At(Math.Cos(angle), Math.Sin(angle)))) != StationarityStatus.Stationary)
            {
                return terms with { Decision = "constant: the seasonal coefficients are not stationary all year round" };
            }
        }

        return terms with { Used = true, Decision = "seasonal: lower AIC, stationary all year round" };
    }

    /// <summary>One-step residuals of the seasonal form per segment (rows t &gt;= p), as ArFit.Residuals gives for the constant AR.</summary>
    internal double[][] Residuals(SeriesWindow window, double[] anomalies, double mean, double[][] x)
    {
        var p = Order;
        var result = new double[window.Segments.Length][];
        for (var s = 0; s < window.Segments.Length; s++)
        {
            var (start, length) = window.Segments[s];
            var e = new double[Math.Max(0, length - p)];
            for (var t = start + p; t < start + length; t++)
            {
                var phi = At(x[1][t], x[2][t]);
                var value = anomalies[t] - mean;
                for (var i = 1; i <= p; i++)
                {
                    value -= phi[i - 1] * (anomalies[t - i] - mean);
                }

                e[t - start - p] = value;
            }

            result[s] = e;
        }

        return result;
    }
}
