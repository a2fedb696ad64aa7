using ForecastHub.Core.Series;

namespace ForecastHub.Core.Autoregression;

/// <summary>
/// Cross-products of the regression x_t on [1, x_{t-1}, ..., x_{t-m}] (demeaned by the common mean),
/// stacking rows t = firstRow..n_s-1 of every segment, so no row reaches across a gap.
/// </summary>
internal sealed class LaggedGram
{
    private LaggedGram(double[,] gram, double[] crossY, double sumSquaresY, int rows, int firstRow)
    {
        FirstRow = firstRow;
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

    public int FirstRow { get; }

    public int Lags => CrossY.Length - 1;

    public static LaggedGram Build(SegmentSummary summary, int lags, int firstRow) =>
        Accumulate(summary, lags, firstRow, int.MaxValue, new double[lags + 1, lags + 1], new double[lags + 1], 0, 0, firstRow);

    /// <summary>
    /// The order-p cross-products on rows t &gt;= p from this Gram of rows t &gt;= Lags (p &lt;= Lags): its leading
    /// block plus rows p..Lags-1 of each segment, so fitting every order costs one big pass, not one per order.
    /// </summary>
    public LaggedGram Narrow(SegmentSummary summary, int order)
    {
        var columns = order + 1;
        var gram = new double[columns, columns];
        var crossY = new double[columns];
        for (var i = 0; i < columns; i++)
        {
            crossY[i] = CrossY[i];
            for (var j = 0; j < columns; j++)
            {
                gram[i, j] = Gram[i, j];
            }
        }

        return Accumulate(summary, order, order, FirstRow, gram, crossY, SumSquaresY, Rows, order);
    }

    private static LaggedGram Accumulate(
        SegmentSummary summary,
        int lags,
        int fromRow,
        int toRow,
        double[,] gram,
        double[] crossY,
        double sumSquaresY,
        int rows,
        int firstRow)
    {
        var columns = lags + 1;
        var regressors = new double[columns];
        regressors[0] = 1;
        foreach (var segment in summary.Segments)
        {
            for (var t = fromRow; t < Math.Min(toRow, segment.Length); t++)
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

        return new LaggedGram(gram, crossY, sumSquaresY, rows, firstRow);
    }
}
