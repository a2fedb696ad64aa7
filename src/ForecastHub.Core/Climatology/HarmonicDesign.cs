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

    public int Columns => 1 + 2 * AnnualHarmonics + 2 * DiurnalHarmonics;

    public IReadOnlyList<string> TermNames()
    {
        var names = new List<string> { "level" };
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
        var rows = new RowFiller(this);
        var n = times.Count;
        var columns = new double[Columns][];
        for (var c = 0; c < columns.Length; c++)
        {
            columns[c] = GC.AllocateUninitializedArray<double>(n);
        }

        // Row by row into a small row-major scratch, then transposed column by column (contiguous writes).
        const int chunk = 512;
        var width = Columns;
        var scratch = new double[chunk * width];
        for (var start = 0; start < n; start += chunk)
        {
            var length = Math.Min(chunk, n - start);
            for (var i = 0; i < length; i++)
            {
                rows.Fill(times[start + i], scratch.AsSpan(i * width, width));
            }

            for (var c = 0; c < width; c++)
            {
                var column = columns[c].AsSpan(start, length);
                for (var i = 0; i < column.Length; i++)
                {
                    column[i] = scratch[(i * width) + c];
                }
            }
        }

        return columns;
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

    /// <summary>cos/sin(k a) for k = 1..count by the angle-addition recurrence (two trig calls per row).</summary>
    private static void Harmonics(double angle, int count, Span<double> target)
    {
        if (count == 0)
        {
            return;
        }

        var (s1, c1) = Math.SinCos(angle);
        var (c, s) = (c1, s1);
        for (var k = 0; k < count; k++)
        {
            target[2 * k] = c;
            target[(2 * k) + 1] = s;
            (c, s) = ((c * c1) - (s * s1), (s * c1) + (c * s1));
        }
    }

    /// <summary>
    /// Design rows for a run of times. Hourly: the local standard time is taken from ticks, with the
    /// current year's first day cached and the diurnal terms cached per minute of the day; the same
    /// numbers as DateTime's Hour, Minute and DayOfYear, without their calendar arithmetic per row.
    /// </summary>
    private sealed class RowFiller
    {
        private const int MinutesPerDay = 24 * 60;
        private readonly HarmonicDesign design;
        private readonly TimeZoneInfo zone;
        private readonly long offsetTicks;
        private readonly int annualColumns;
        private double[]? diurnal;
        private bool[]? diurnalKnown;
        private long yearFirstDay = long.MaxValue;
        private long nextYearFirstDay = long.MinValue;

        public RowFiller(HarmonicDesign design)
        {
            this.design = design;
            zone = GridBuilder.FindZone(design.TimeZone);
            offsetTicks = zone.BaseUtcOffset.Ticks;
            annualColumns = 2 * design.AnnualHarmonics;
        }

        public void Fill(DateTimeOffset time, Span<double> row)
        {
            row[0] = 1;
            if (design.Cadence == GridCadence.Daily)
            {
                double doy = GridBuilder.LocalDate(time, zone).DayOfYear - 1;
                Harmonics(2 * Math.PI * doy / YearDays, design.AnnualHarmonics, row[1..]);
                Harmonics(0, design.DiurnalHarmonics, row[(1 + annualColumns)..]);
                return;
            }

            var ticks = time.UtcTicks + offsetTicks;
            var day = ticks / TimeSpan.TicksPerDay;
            var minuteOfDay = (int)(ticks % TimeSpan.TicksPerDay / TimeSpan.TicksPerMinute);
            if (day < yearFirstDay || day >= nextYearFirstDay)
            {
                var year = new DateTime(day * TimeSpan.TicksPerDay, DateTimeKind.Unspecified).Year;
                yearFirstDay = new DateTime(year, 1, 1).Ticks / TimeSpan.TicksPerDay;
                nextYearFirstDay = year < DateTime.MaxValue.Year ? new DateTime(year + 1, 1, 1).Ticks / TimeSpan.TicksPerDay : long.MaxValue;
            }

            var hour = (minuteOfDay / 60) + (minuteOfDay % 60 / 60.0);
            var doyHourly = day - yearFirstDay + (hour / 24);
            Harmonics(2 * Math.PI * doyHourly / YearDays, design.AnnualHarmonics, row[1..]);
            DiurnalTerms(minuteOfDay, hour).CopyTo(row[(1 + annualColumns)..]);
        }

        private ReadOnlySpan<double> DiurnalTerms(int minuteOfDay, double hour)
        {
            var width = 2 * design.DiurnalHarmonics;
            diurnal ??= new double[MinutesPerDay * width];
            diurnalKnown ??= new bool[MinutesPerDay];
            var terms = diurnal.AsSpan(minuteOfDay * width, width);
            if (!diurnalKnown[minuteOfDay])
            {
                Harmonics(2 * Math.PI * hour / 24, design.DiurnalHarmonics, terms);
                diurnalKnown[minuteOfDay] = true;
            }

            return terms;
        }
    }
}
