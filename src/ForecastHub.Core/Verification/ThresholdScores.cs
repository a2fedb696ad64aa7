namespace ForecastHub.Core.Verification;

/// <summary>One bin of a reliability table: forecasts in [From, To), their mean, how often the event happened, and how many.</summary>
public sealed record ReliabilityBin(double From, double To, double ForecastMean, double ObservedFrequency, int Count);

/// <summary>
/// Verification of a threshold's probability forecasts. Brier score BS = (1/N) sum (p_i - o_i)^2
/// (Brier 1950, Monthly Weather Review 78, 1-3); skill BSS = 1 - BS / BS_ref against the
/// climatological base rate of the same season (the event's frequency among the verified cases of
/// the same calendar month, the sample climatology of Wilks, Statistical Methods in the Atmospheric
/// Sciences, ch. 8: from memory); reliability table of 10 equal probability bins (p = 1 falls in the
/// last). Empty bins have NaN means; no case at all gives NaN scores.
/// </summary>
public sealed record ThresholdVerification(int Count, double BaseRate, double Brier, double ClimatologyBrier, double BrierSkill, IReadOnlyList<ReliabilityBin> Reliability);

/// <summary>Collects (probability, event happened, calendar month) cases of one threshold and scores them.</summary>
public sealed class ThresholdScoreAccumulator
{
    public const int Bins = 10;

    private readonly List<(double P, bool Event, int Month)> cases = [];

    public int Count => cases.Count;

    /// <param name="month">1-12: the month whose base rate is the reference for this case.</param>
    public void Add(double probability, bool happened, int month)
    {
        if (double.IsNaN(probability))
        {
            return;
        }

        ArgumentOutOfRangeException.ThrowIfLessThan(month, 1);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(month, 12);
        cases.Add((Math.Clamp(probability, 0, 1), happened, month));
    }

    public ThresholdVerification Result()
    {
        var n = cases.Count;
        var bins = new ReliabilityBin[Bins];
        for (var b = 0; b < Bins; b++)
        {
            var inBin = cases.Where(c => Bin(c.P) == b).ToArray();
            bins[b] = new ReliabilityBin(b / (double)Bins, (b + 1) / (double)Bins,
                inBin.Length == 0 ? double.NaN : inBin.Average(c => c.P),
                inBin.Length == 0 ? double.NaN : inBin.Average(c => c.Event ? 1.0 : 0.0),
                inBin.Length);
        }

        if (n == 0)
        {
            return new ThresholdVerification(0, double.NaN, double.NaN, double.NaN, double.NaN, bins);
        }

        var rates = cases.GroupBy(c => c.Month).ToDictionary(g => g.Key, g => g.Average(c => c.Event ? 1.0 : 0.0));
        var brier = cases.Average(c => Square(c.P - (c.Event ? 1 : 0)));
        var reference = cases.Average(c => Square(rates[c.Month] - (c.Event ? 1 : 0)));
        var skill = reference > 0 ? 1 - brier / reference : double.NaN;
        return new ThresholdVerification(n, cases.Average(c => c.Event ? 1.0 : 0.0), brier, reference, skill, bins);
    }

    private static int Bin(double p) => Math.Min(Bins - 1, (int)(p * Bins));

    private static double Square(double x) => x * x;
}
