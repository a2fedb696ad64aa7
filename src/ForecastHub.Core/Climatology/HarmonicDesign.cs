using System.Collections.Concurrent;
using ForecastHub.Core.Grid;

namespace ForecastHub.Core.Climatology;

/// <summary>
/// The harmonic regression design. Columns: level, then cos/sin(2 pi k doy / 365.25) for
/// k = 1..AnnualHarmonics, then cos/sin(2 pi j hour / 24) for j = 1..DiurnalHarmonics.
/// Daily series: doy = 0-based day of year of the local date. Hourly series: local standard time
/// s = UTC + the zone's standard offset (no DST shift, so the daily cycle stays tied to the sun),
/// doy = 0-based day of year of s + hour(s)/24, hour = hour(s) + minutes/60.
/// </summary>
public sealed record HarmonicDesign(GridCadence Cadence, string TimeZone, int AnnualHarmonics, int DiurnalHarmonics)
{
    public const double YearDays = 365.25;

    /// <summary>The intercept: the mean temperature; every other term is an amplitude (a temperature difference).</summary>
    public const string LevelTerm = "level";

    public int Columns => 1 + 2 * AnnualHarmonics + 2 * DiurnalHarmonics;

    public IReadOnlyList<string> TermNames()
    {
        var names = new List<string> { LevelTerm };
        for (var k = 1; k <= AnnualHarmonics; k++)
        {
            names.Add($"annual-cos-{k}");
            names.Add($"annual-sin-{k}");
        }

        for (var j = 1; j <= DiurnalHarmonics; j++)
        {
            names.Add($"diurnal-cos-{j}");
            names.Add($"diurnal-sin-{j}");
        }

        return names;
    }

    /// <summary>Column-major design: one array per term, one element per time.</summary>
    public double[][] ColumnMajor(IReadOnlyList<DateTimeOffset> times)
    {
        ArgumentNullException.ThrowIfNull(times);
        var columns = new double[Columns][];
        for (var c = 0; c < columns.Length; c++)
        {
            columns[c] = GC.AllocateUninitializedArray<double>(times.Count);
        }

        FillColumns(times, columns);
        return columns;
    }

    /// <summary>Writes the design at <paramref name="times"/> into the leading rows of <paramref name="columns"/> (one per term, each at least that long).</summary>
    internal void FillColumns(IReadOnlyList<DateTimeOffset> times, double[][] columns)
    {
        var rows = new RowFiller(this);
        Span<double> row = stackalloc double[Columns];
        for (var i = 0; i < times.Count; i++)
        {
            rows.Fill(times[i], row);
            for (var c = 0; c < row.Length; c++)
            {
                columns[c][i] = row[c];
            }
        }
    }

    /// <summary>The regression mean at each time for the given coefficients.</summary>
    public double[] Evaluate(IReadOnlyList<DateTimeOffset> times, IReadOnlyList<double> coefficients)
    {
        ArgumentNullException.ThrowIfNull(times);
        ArgumentNullException.ThrowIfNull(coefficients);
        var rows = new RowFiller(this);
        Span<double> row = stackalloc double[Columns];
        Span<double> beta = stackalloc double[Columns];
        for (var c = 0; c < beta.Length; c++)
        {
            beta[c] = coefficients[c];
        }

        var result = new double[times.Count];
        for (var i = 0; i < times.Count; i++)
        {
            rows.Fill(times[i], row);
            var sum = 0.0;
            for (var c = 0; c < row.Length; c++)
            {
                sum += row[c] * beta[c];
            }

            result[i] = sum;
        }

        return result;
    }

    /// <summary>cos/sin(k a) for k = 1..count by the angle-addition recurrence, from cos/sin(a).</summary>
    private static void Harmonics(double c1, double s1, int count, Span<double> target)
    {
        var (c, s) = (c1, s1);
        for (var k = 0; k < count; k++)
        {
            target[2 * k] = c;
            target[(2 * k) + 1] = s;
            (c, s) = ((c * c1) - (s * s1), (s * c1) + (c * s1));
        }
    }

    /// <summary>
    /// Design rows for a run of times without calendar arithmetic or trig calls per row. A time is
    /// reduced to (0-based day of year d, minute of the day m): hourly from the ticks of local
    /// standard time with the current year's first day cached (the same numbers as DateTime's
    /// DayOfYear, Hour and Minute), daily from the local date with m = 0. The annual angle
    /// 2 pi (d + hour/24) / 365.25 is the sum of a per-day and a per-minute angle, so its cos/sin come
    /// from two small tables by the addition formula (within an ulp or two of direct calls); the
    /// diurnal terms are tabulated per minute of the day.
    /// </summary>
    private sealed class RowFiller
    {
        private const int MinutesPerDay = 24 * 60;

        // Shared by every design and thread (filled once): a forecast evaluates a handful of times per call.
        private static readonly double[] DayCos = new double[367];
        private static readonly double[] DaySin = new double[367];
        private static readonly double[] MinuteCos = new double[MinutesPerDay];
        private static readonly double[] MinuteSin = new double[MinutesPerDay];
        private static readonly ConcurrentDictionary<int, double[]> DiurnalTables = new();

        private readonly HarmonicDesign design;
        private readonly TimeZoneInfo zone;
        private readonly long offsetTicks;
        private readonly double[] diurnal;
        private long yearFirstDay = long.MaxValue;
        private long nextYearFirstDay = long.MinValue;

        static RowFiller()
        {
            for (var d = 0; d < DayCos.Length; d++)
            {
                (DaySin[d], DayCos[d]) = Math.SinCos(2 * Math.PI * d / YearDays);
            }

            for (var m = 0; m < MinutesPerDay; m++)
            {
                (MinuteSin[m], MinuteCos[m]) = Math.SinCos(2 * Math.PI * (Hour(m) / 24) / YearDays);
            }
        }

        public RowFiller(HarmonicDesign design)
        {
            this.design = design;
            zone = GridBuilder.FindZone(design.TimeZone);
            offsetTicks = zone.BaseUtcOffset.Ticks;
            diurnal = DiurnalTables.GetOrAdd(design.DiurnalHarmonics, DiurnalTable);
        }

        public void Fill(DateTimeOffset time, Span<double> row)
        {
            var (day, minute) = design.Cadence == GridCadence.Daily ? (GridBuilder.LocalDate(time, zone).DayOfYear - 1, 0) : Hourly(time);
            row[0] = 1;
            if (design.AnnualHarmonics > 0)
            {
                var (cd, sd, cm, sm) = (DayCos[day], DaySin[day], MinuteCos[minute], MinuteSin[minute]);
                Harmonics((cd * cm) - (sd * sm), (sd * cm) + (cd * sm), design.AnnualHarmonics, row[1..]);
            }

            var width = 2 * design.DiurnalHarmonics;
            diurnal.AsSpan(minute * width, width).CopyTo(row[(1 + (2 * design.AnnualHarmonics))..]);
        }

        /// <summary>hour(s) + minute(s)/60 for minute m of the day.</summary>
        private static double Hour(int minute) => (minute / 60) + (minute % 60 / 60.0);

        /// <summary>cos/sin(2 pi j hour / 24), j = 1..count, for every minute of the day.</summary>
        private static double[] DiurnalTable(int count)
        {
            var width = 2 * count;
            var table = new double[MinutesPerDay * width];
            for (var m = 0; m < MinutesPerDay && width > 0; m++)
            {
                var (s1, c1) = Math.SinCos(2 * Math.PI * Hour(m) / 24);
                Harmonics(c1, s1, count, table.AsSpan(m * width, width));
            }

            return table;
        }

        private (int Day, int Minute) Hourly(DateTimeOffset time)
        {
            var ticks = time.UtcTicks + offsetTicks;
            var day = ticks / TimeSpan.TicksPerDay;
            if (day < yearFirstDay || day >= nextYearFirstDay)
            {
                var year = new DateTime(day * TimeSpan.TicksPerDay, DateTimeKind.Unspecified).Year;
                yearFirstDay = new DateTime(year, 1, 1).Ticks / TimeSpan.TicksPerDay;
                nextYearFirstDay = year < DateTime.MaxValue.Year ? new DateTime(year + 1, 1, 1).Ticks / TimeSpan.TicksPerDay : long.MaxValue;
            }

            return ((int)(day - yearFirstDay), (int)(ticks % TimeSpan.TicksPerDay / TimeSpan.TicksPerMinute));
        }
    }
}
