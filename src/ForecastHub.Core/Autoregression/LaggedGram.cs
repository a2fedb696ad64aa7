using ForecastHub.Core.Series;

namespace ForecastHub.Core.Autoregression;

/// <summary>
/// Cross-products of the regression x_t on [1, x_{t-1}, ..., x_{t-m}] (demeaned by the common mean),
/// stacking rows t = firstRow..n_s-1 of every segment, so no row reaches across a gap.
/// </summary>
internal sealed class LaggedGram
{
    private LaggedGram(double[,] gram, double[] crossY, double sumSquaresY, int rows)
    {
        Gram = gram;
        CrossY = crossY;
        SumSquaresY = sumSquaresY;
        Rows = rows;
    }

    /// <summary>X'X with column 0 the intercept and column i the lag-i value.</summary>
    public double[,] Gram { get; }

    /// <summary>X'y.</summary>
    public double[] CrossY { get; }

    public double SumSquaresY { get; }

    public int Rows { get; }

    public static LaggedGram Build(SegmentSummary summary, int lags, int firstRow)
    {
        var columns = lags + 1;
        var gram = new double[columns, columns];
        var crossY = new double[columns];
        var sumSquaresY = 0.0;
        var rows = 0;
        var regressors = new double[columns];
        regressors[0] = 1;
        foreach (var segment in summary.Segments)
        {
            for (var t = firstRow; t < segment.Length; t++)
            {
                for (var i = 1; i <= lags; i++)
                {
                    regressors[i] = segment[t - i] - summary.Mean;
                }

                var y = segment[t] - summary.Mean;
                sumSquaresY += y * y;
                for (var i = 0; i < columns; i++)
                {
                    var ri = regressors[i];
                    crossY[i] += ri * y;
                    for (var j = 0; j <= i; j++)
                    {
                        gram[i, j] += ri * regressors[j];
                    }
                }

                rows++;
            }
        }

        for (var i = 0; i < columns; i++)
        {
            for (var j = i + 1; j < columns; j++)
            {
                gram[i, j] = gram[j, i];
            }
        }

        return new LaggedGram(gram, crossY, sumSquaresY, rows);
    }
}
