using System.Buffers;
using System.Globalization;
using ForecastHub.Core.Climatology;
using ForecastHub.Core.Forecasting;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Linear;
using ForecastHub.Core.Series;
using MathNet.Numerics.Distributions;

namespace ForecastHub.Core.Modeling;

/// <summary>
/// Calibrated intervals from rolling-origin out-of-sample errors. The fit window is split at 70%
/// and 85% of its points: a model fitted (same design and settings) on the points before each
/// split forecasts from every origin in the next 15% (at most <see cref="MaxOriginsPerFold"/>,
/// evenly spaced) up to <see cref="Horizons"/> steps ahead. Errors on observed (not interpolated)
/// steps are standardised by that model's sd, and their empirical quantiles (R type 7) per horizon
/// form the table, pooling neighbouring horizons until each row rests on at least
/// <see cref="MinErrorsPerRow"/> errors. The errors thus include parameter and seasonal-fit uncertainty.
/// </summary>
public static class Calibration
{
    public const int MaxOriginsPerFold = 1500;
    public const int MinErrorsPerRow = 1000;
    public const int MinErrors = 100;

    public static readonly IReadOnlyList<double> Probabilities =
    [
        0.005, 0.01, 0.025, 0.05, 0.1, 0.15, 0.2, 0.25, 0.3, 0.35, 0.4, 0.45, 0.5,
        0.55, 0.6, 0.65, 0.7, 0.75, 0.8, 0.85, 0.9, 0.95, 0.975, 0.99, 0.995,
    ];

    private static readonly double[] Scores = Probabilities.Select(p => Normal.InvCDF(0, 1, p)).ToArray();

    // Cells narrower than the closest pair of table scores, so a lookup walks at most one step.
    private const int SegmentCells = 128;
    private static readonly double CellsPerUnitScore = SegmentCells / (Scores[^2] - Scores[1]);
    private static readonly byte[] CellSegments = BuildCellSegments();

    /// <summary>How far a table may be carried: the backtest's refit interval (<see cref="Verification.BacktestOptions.DefaultRefitEveryDays"/>),
    /// so a carried table is no older than the tables behind the documented coverage figures.</summary>
    public static readonly TimeSpan DefaultCarryLimit = TimeSpan.FromDays(Verification.BacktestOptions.DefaultRefitEveryDays);

    /// <summary>A table is rebuilt once the window's point count has moved this fraction from the count it was built on (common practice, no source).</summary>
    public const double CarryPointsTolerance = 0.05;

    public static int Horizons(GridCadence cadence) => cadence == GridCadence.Hourly ? 48 : 7;

    /// <summary>
    /// Whether a new fit on a window ending at <paramref name="windowEnd"/> with <paramref name="windowPoints"/> points keeps <paramref name="previous"/>'s table instead of rebuilding it:
    /// the table records the window it was built from, the settings and harmonic design are the same, the new window ends
    /// no earlier than that one and at most <paramref name="carryLimit"/> later (zero: never carry), and its point count is
    /// within <see cref="CarryPointsTolerance"/> of that one's. The folds of a rebuilt table would rest on almost the same errors.
    /// </summary>
    public static bool CanCarry(SiteModel? previous, DateTimeOffset windowEnd, int windowPoints, HarmonicDesign design, ModelSettings settings, TimeSpan carryLimit)
    {
        ArgumentNullException.ThrowIfNull(settings);
        if (previous?.Calibration?.BuiltOn is not { } built || settings.IntervalMethod != IntervalMethod.Calibrated || carryLimit <= TimeSpan.Zero)
        {
            return false;
        }

        var newer = windowEnd - built.To;
        return previous.Settings == settings && previous.Climatology.Design == design
            && newer >= TimeSpan.Zero && newer <= carryLimit
            && Math.Abs(windowPoints - built.Points) <= CarryPointsTolerance * built.Points;
    }

    /// <summary>The note of a model whose table was carried.</summary>
    internal static string CarriedNote(CalibrationTable table, TimeSpan carryLimit) => string.Create(CultureInfo.InvariantCulture,
        $"Interval calibration carried from the fit of the window ending {table.BuiltOn!.To:O} ({table.Errors} out-of-sample errors); rebuilt once the data end moves more than {carryLimit.TotalDays:0.##} days past that, the points change by more than {CarryPointsTolerance * 100:0}% or the settings change.");

    /// <summary>The interval at a level for horizon h: mean + sd x quantile of the standardised errors.</summary>
    public static PredictionInterval Interval(CalibrationTable table, int horizon, double mean, double sd, double level)
    {
        ArgumentNullException.ThrowIfNull(table);
        GaussianInterval.Multiplier(level);
        var row = Row(table, horizon);
        return new PredictionInterval(level, mean + sd * Quantile(row, (1 - level) / 2), mean + sd * Quantile(row, (1 + level) / 2));
    }

    /// <summary>Quantile of the standardised error at probability p: linear in the normal score between table points, extrapolated beyond them.</summary>
    public static double Quantile(ReadOnlySpan<double> row, double p) => QuantileAtScore(row, Normal.InvCDF(0, 1, p));

    /// <summary>The standardised error at normal score z (the quantile at probability Phi(z)); piecewise linear in z.</summary>
    public static double QuantileAtScore(ReadOnlySpan<double> row, double z)
    {
        var i = Segment(z);
        var w = (z - Scores[i - 1]) / (Scores[i] - Scores[i - 1]);
        return row[i - 1] + w * (row[i] - row[i - 1]);
    }

    /// <summary>
    /// The segment [Scores[i - 1], Scores[i]] that z falls in: the smallest i in 1..n-2 with Scores[i] >= z, else n - 1
    /// (NaN gives 1). A table of cells over the score axis gives a start at most a step or two away, then a walk settles it.
    /// </summary>
    private static int Segment(double z)
    {
        var cell = (z - Scores[1]) * CellsPerUnitScore;
        var i = !(cell >= 0) ? 1 : cell < SegmentCells ? CellSegments[(int)cell] : Scores.Length - 1;
        while (i > 1 && Scores[i - 1] >= z)
        {
            i--;
        }

        while (i < Scores.Length - 1 && Scores[i] < z)
        {
            i++;
        }

        return i;
    }

    /// <summary>Per cell of the score axis from Scores[1] to Scores[n - 2], the segment of the cell's lower edge.</summary>
    private static byte[] BuildCellSegments()
    {
        var cells = new byte[SegmentCells];
        for (var c = 0; c < SegmentCells; c++)
        {
            var edge = Scores[1] + (c / CellsPerUnitScore);
            var i = 1;
            while (i < Scores.Length - 1 && Scores[i] < edge)
            {
                i++;
            }

            cells[c] = (byte)i;
        }

        return cells;
    }

    /// <summary>
    /// The inverse of <see cref="QuantileAtScore"/>: the smallest normal score z with Q(z) >= x, so P(error &lt; x) = Phi(z).
    /// A flat end segment that x lies beyond gives -infinity or +infinity.
    /// </summary>
    public static double ScoreOf(ReadOnlySpan<double> row, double x)
    {
        var i = 1;
        while (i < Scores.Length - 1 && row[i] < x)
        {
            i++;
        }

        var rise = row[i] - row[i - 1];
        if (rise > 0)
        {
            return Scores[i - 1] + (x - row[i - 1]) / rise * (Scores[i] - Scores[i - 1]);
        }

        return x < row[i - 1] ? double.NegativeInfinity : x > row[i] ? double.PositiveInfinity : Scores[i - 1];
    }

    /// <summary>The calibration row used at a horizon (1-based); beyond the table the last row.</summary>
    public static double[] Row(CalibrationTable table, int horizon)
    {
        ArgumentNullException.ThrowIfNull(table);
        return table.Quantiles[Math.Clamp(horizon, 1, table.Quantiles.Count) - 1];
    }

    /// <param name="x">The climatology design columns at the window's times (null for a level-only design): fold
    /// fits read their leading rows, and the fold models' climatology and variance factors are combinations of them.</param>
    internal static CalibrationTable? Build(SeriesWindow window, HarmonicDesign design, ModelSettings settings, double[][]? x, List<string> notes)
    {
        var horizons = Horizons(design.Cadence);
        (double From, double To)[] splits = [(0.70, 0.85), (0.85, 1.0)];
        var results = new HorizonErrors?[splits.Length];
        try
        {
            // The folds are independent: fitted side by side, their errors joined afterwards.
            Parallel.For(0, splits.Length, f =>
            {
                var n = window.Count;
                var trainCount = (int)(n * splits[f].From);
                var testEnd = (int)(n * splits[f].To);
                SiteModel fold;
                try
                {
                    fold = SiteModelFitter.FitCore(window.Prefix(trainCount), settings, design, x, [], diagnostics: false);
                }
                catch (SeriesException)
                {
                    return;
                }

                results[f] = CollectErrors(window, fold, x, trainCount - 1, testEnd - 1, horizons);
            });

            var folds = results.OfType<HorizonErrors>().ToArray();
            var total = folds.Sum(e => e.Total);
            if (total < MinErrors)
            {
                notes.Add($"Too little data to calibrate intervals ({total} out-of-sample errors); Gaussian intervals are used.");
                return null;
            }

            return new CalibrationTable(Probabilities, QuantileRows(folds, horizons), total, folds.Sum(e => e.Origins), folds.Length);
        }
        finally
        {
            foreach (var result in results)
            {
                result?.Return();
            }
        }
    }

    /// <summary>A fold's standardised errors by horizon, in pooled arrays (a calibration collects about 150,000 of them).</summary>
    private sealed class HorizonErrors
    {
        private readonly double[][] values;
        private readonly int[] counts;

        public HorizonErrors(int horizons, int capacity)
        {
            values = new double[horizons][];
            counts = new int[horizons];
            for (var h = 0; h < horizons; h++)
            {
                values[h] = ArrayPool<double>.Shared.Rent(capacity);
            }
        }

        public int Origins { get; set; }

        public int Total => counts.Sum();

        public int Count(int horizon) => counts[horizon];

        public ReadOnlySpan<double> Of(int horizon) => values[horizon].AsSpan(0, counts[horizon]);

        public void Add(int horizon, double error) => values[horizon][counts[horizon]++] = error;

        public void Return()
        {
            foreach (var array in values)
            {
                ArrayPool<double>.Shared.Return(array);
            }
        }
    }

    private static HorizonErrors CollectErrors(SeriesWindow window, SiteModel fold, double[][]? x, int firstOrigin, int lastOrigin, int horizons)
    {
        var ar = fold.Ar;

        // Only the points the origins read: each origin's last p values and the steps it forecasts.
        var start = Math.Max(0, firstOrigin - ar.Order + 1);
        var end = Math.Min(window.Count, lastOrigin + horizons);
        var (anomalies, g) = MeanAndFactors(window, fold, x, start, end);
        for (var i = 0; i < anomalies.Length; i++)
        {
            // The climatology mean is replaced by the anomaly in place.
            anomalies[i] = window.Values[start + i] - anomalies[i];
        }

        var psi = ArForecast.PsiWeights(ar.Coefficients, horizons);
        var mean = new double[horizons];
        var sd = new double[horizons];
        var stride = Math.Max(1, (lastOrigin - firstOrigin + 1) / MaxOriginsPerFold);
        var errors = new HorizonErrors(horizons, Math.Max(0, lastOrigin - firstOrigin + stride - 1) / stride);
        for (var o = firstOrigin; o < lastOrigin; o += stride)
        {
            var segment = window.Segments[window.SegmentOf(o)];
            var segmentEnd = segment.Start + segment.Length;
            var steps = Math.Min(horizons, segmentEnd - 1 - o);
            if (o - ar.Order + 1 < segment.Start || steps < 1)
            {
                continue;
            }

            errors.Origins++;
            AnomalyPath.Compute(ar, anomalies.AsSpan(o - ar.Order + 1 - start, ar.Order), psi, g.AsSpan(o + 1 - start, steps), mean.AsSpan(0, steps), sd.AsSpan(0, steps));
            for (var h = 1; h <= steps; h++)
            {
                if (!window.Interpolated[o + h])
                {
                    errors.Add(h - 1, (anomalies[o + h - start] - mean[h - 1]) / sd[h - 1]);
                }
            }
        }

        return errors;
    }

    /// <summary>The fold model's climatology mean and variance factors at the window's points [<paramref name="start"/>, <paramref name="end"/>);
    /// from the design columns when given (the same sums, term by term, as HarmonicDesign.Evaluate), else from the times.</summary>
    private static (double[] Mean, double[] Factors) MeanAndFactors(SeriesWindow window, SiteModel fold, double[][]? x, int start, int end)
    {
        if (x is null)
        {
            var times = window.Times.Slice(start, end - start);
            return (fold.Climatology.Mean(times), fold.VarianceSeason.Factors(times));
        }

        var mean = new double[end - start];
        SpanMath.AddCombination([.. fold.Climatology.Terms.Select(t => t.Coefficient)], x, start, mean);

        var season = fold.VarianceSeason;
        var g = new double[end - start];
        var source = SiteModelFitter.VarianceColumns(fold.Climatology.Design, season.Design);
        SpanMath.AddCombination([.. season.Coefficients], [.. source.Select(c => x[c])], start, g);

        for (var i = 0; i < g.Length; i++)
        {
            g[i] = Math.Max(season.Floor, g[i]);
        }

        return (mean, g);
    }

    /// <summary>Per horizon, R type 7 quantiles of the folds' errors at that horizon, joined by those of ever wider
    /// neighbouring horizons until the row rests on at least <see cref="MinErrorsPerRow"/> errors.</summary>
    private static double[][] QuantileRows(HorizonErrors[] folds, int horizons)
    {
        int Count(int h) => folds.Sum(f => f.Count(h));
        var rows = new double[horizons][];
        var pooled = ArrayPool<double>.Shared.Rent(folds.Sum(f => f.Total));
        try
        {
            for (var h = 0; h < horizons; h++)
            {
                var count = Count(h);
                var width = 0;
                while (count < MinErrorsPerRow && width + 1 < horizons)
                {
                    width++;
                    count += (h - width >= 0 ? Count(h - width) : 0) + (h + width < horizons ? Count(h + width) : 0);
                }

                var filled = 0;
                for (var k = Math.Max(0, h - width); k <= Math.Min(horizons - 1, h + width); k++)
                {
                    foreach (var fold in folds)
                    {
                        fold.Of(k).CopyTo(pooled.AsSpan(filled));
                        filled += fold.Count(k);
                    }
                }

                rows[h] = OrderStatistics.TypeSevenQuantiles(pooled.AsSpan(0, filled), Probabilities);
            }
        }
        finally
        {
            ArrayPool<double>.Shared.Return(pooled);
        }

        return rows;
    }
}
