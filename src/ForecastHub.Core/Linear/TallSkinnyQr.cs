namespace ForecastHub.Core.Linear;

/// <summary>
/// Running Householder triangle of a tall matrix whose rows arrive in blocks (tall-skinny QR): the
/// triangle of the rows so far is stacked on top of the next block and the stack triangularised
/// again. Orthogonal steps only, so the result is the R of the whole matrix up to row signs (which do
/// not change least-squares coefficients, the residual sum of squares or (R'R)^-1). Blocks are small
/// enough for the working set to stay in L1, and rows are written straight into the block buffer,
/// so callers never build the full (e.g. pre-whitened) matrix.
/// </summary>
internal sealed class TallSkinnyQr
{
    /// <summary>Rows per block: 12 columns of (12 + 256) doubles fit a 32 KiB L1 cache.</summary>
    public const int BlockRows = 256;

    private readonly double[][] buffer;
    private int carried;

    public TallSkinnyQr(int columns)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(columns);
        Columns = columns;
        buffer = new double[columns][];
        for (var c = 0; c < columns; c++)
        {
            buffer[c] = new double[columns + BlockRows];
        }
    }

    public int Columns { get; }

    /// <summary>Rows added so far.</summary>
    public int Rows { get; private set; }

    /// <summary>Where the next block's values of column c go (at most <see cref="BlockRows"/>); then call <see cref="Commit"/>.</summary>
    public Span<double> Block(int column) => buffer[column].AsSpan(carried, BlockRows);

    /// <summary>Folds the first <paramref name="count"/> rows written through <see cref="Block"/> into the triangle.</summary>
    public void Commit(int count)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(count);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(count, BlockRows);
        if (count == 0)
        {
            return;
        }

        var rows = carried + count;
        Triangularise(rows);
        carried = Math.Min(Columns, rows);
        Rows += count;
    }

    /// <summary>The Columns x Columns upper triangle (rows beyond the rows added are zero).</summary>
    public double[,] Triangle()
    {
        var r = new double[Columns, Columns];
        for (var c = 0; c < Columns; c++)
        {
            for (var i = 0; i <= c && i < carried; i++)
            {
                r[i, c] = buffer[c][i];
            }
        }

        return r;
    }

    private void Triangularise(int rows)
    {
        var top = Math.Min(Columns, rows);
        for (var j = 0; j < top; j++)
        {
            var v = buffer[j].AsSpan(j, rows - j);
            var normSquared = SpanMath.Dot(v, v);
            if (normSquared == 0)
            {
                continue;
            }

            var v0 = v[0];
            var alpha = v0 > 0 ? -Math.Sqrt(normSquared) : Math.Sqrt(normSquared);
            v[0] = v0 - alpha;

            // |v|^2 after the shift: (v0 - alpha)^2 + |v|^2 - v0^2 = 2 (|v|^2 - alpha v0), no cancellation as alpha v0 <= 0.
            var vv = 2 * (normSquared - (alpha * v0));
            for (var c = j + 1; c < Columns; c++)
            {
                var w = buffer[c].AsSpan(j, rows - j);
                SpanMath.Axpy(-2 * SpanMath.Dot(v, w) / vv, v, w);
            }

            // Keep R in the top rows: the diagonal, and zeros where the reflector was (rows below are refilled).
            buffer[j][j] = alpha;
            buffer[j].AsSpan(j + 1, top - j - 1).Clear();
        }
    }
}
