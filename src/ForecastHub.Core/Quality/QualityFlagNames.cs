namespace ForecastHub.Core.Quality;

/// <summary>The contract names of QC flags: <c>out-of-range</c>, <c>spike</c>, <c>flat-line</c>.</summary>
public static class QualityFlagNames
{
    public const string OutOfRange = "out-of-range";
    public const string Spike = "spike";
    public const string FlatLine = "flat-line";

    /// <summary>The names of the set flags, in a fixed order; empty for <see cref="QualityFlags.None"/>.</summary>
    public static IReadOnlyList<string> Of(QualityFlags flags)
    {
        var names = new List<string>(3);
        if (flags.HasFlag(QualityFlags.OutOfRange))
        {
            names.Add(OutOfRange);
        }
        if (flags.HasFlag(QualityFlags.Spike))
        {
            names.Add(Spike);
        }
        if (flags.HasFlag(QualityFlags.FlatLine))
        {
            names.Add(FlatLine);
        }
        return names;
    }
}
