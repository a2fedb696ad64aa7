namespace ForecastHub.Core.Series;

/// <summary>Point count, common mean and segment lengths of a validated segmented series.</summary>
internal sealed class SegmentSummary
{
    private SegmentSummary(IReadOnlyList<double[]> segments, int count, double mean, bool isConstant)
    {
        Segments = segments;
        Count = count;
        Mean = mean;
        IsConstant = isConstant;
    }

    public IReadOnlyList<double[]> Segments { get; }

    public int Count { get; }

    public double Mean { get; }

    public bool IsConstant { get; }

    /// <summary>Validates the segments: null is an argument error, NaN/infinity and an empty total are <see cref="SeriesException"/>.</summary>
    public static SegmentSummary Of(IReadOnlyList<double[]> segments)
    {
        ArgumentNullException.ThrowIfNull(segments);
        var count = 0;
        var sum = 0.0;
        double? first = null;
        var isConstant = true;
        for (var s = 0; s < segments.Count; s++)
        {
            var segment = segments[s] ?? throw new ArgumentException($"Segment {s} is null.", nameof(segments));
            for (var t = 0; t < segment.Length; t++)
            {
                var value = segment[t];
                if (!double.IsFinite(value))
                {
                    throw new SeriesException(SeriesProblem.NonFinite, $"Segment {s} has a non-finite value at index {t}.");
                }

                first ??= value;
                isConstant &= value == first.Value;
                sum += value;
                count++;
            }
        }

        if (count == 0)
        {
            throw new SeriesException(SeriesProblem.Empty, "The series has no points.");
        }

        return new SegmentSummary(segments, count, sum / count, isConstant);
    }

    /// <summary>Throws <see cref="SeriesProblem.Constant"/> when the series has zero variance.</summary>
    public SegmentSummary RequireVariance()
    {
        if (IsConstant)
        {
            throw new SeriesException(SeriesProblem.Constant, "The series is constant (zero variance).");
        }

        return this;
    }

    /// <summary>Rows available to a regression on <paramref name="lags"/> lags: sum over segments of max(0, n_s - lags).</summary>
    public int LaggedRows(int lags)
    {
        var rows = 0;
        foreach (var segment in Segments)
        {
            rows += Math.Max(0, segment.Length - lags);
        }

        return rows;
    }

    /// <summary>Each segment minus the common mean, as fresh arrays.</summary>
    public double[][] Centered()
    {
        var result = new double[Segments.Count][];
        for (var s = 0; s < Segments.Count; s++)
        {
            var source = Segments[s];
            var target = new double[source.Length];
            for (var t = 0; t < source.Length; t++)
            {
                target[t] = source[t] - Mean;
            }

            result[s] = target;
        }

        return result;
    }
}
