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
        var zone = GridBuilder.FindZone(TimeZone);
        var columns = new double[Columns][];
        for (var c = 0; c < columns.Length; c++)
        {
            columns[c] = new double[times.Count];
        }

        Span<double> row = stackalloc double[Columns];
        for (var i = 0; i < times.Count; i++)
        {
            Fill(times[i], zone, row);
            for (var c = 0; c < row.Length; c++)
            {
                columns[c][i] = row[c];
            }
        }

        return columns;
    }

    /// <summary>The regression mean at each time for the given coefficients.</summary>
    public double[] Evaluate(IReadOnlyList<DateTimeOffset> times, IReadOnlyList<double> coefficients)
    {
        ArgumentNullException.ThrowIfNull(times);
        ArgumentNullException.ThrowIfNull(coefficients);
        var zone = GridBuilder.FindZone(TimeZone);
        Span<double> row = stackalloc double[Columns];
        var result = new double[times.Count];
        for (var i = 0; i < times.Count; i++)
        {
            Fill(times[i], zone, row);
            var sum = 0.0;
            for (var c = 0; c < row.Length; c++)
            {
                sum += row[c] * coefficients[c];
            }

            result[i] = sum;
        }

        return result;
    }

    internal void Fill(DateTimeOffset time, TimeZoneInfo zone, Span<double> row)
    {
        double doy;
        var hour = 0.0;
        if (Cadence == GridCadence.Daily)
        {
            doy = GridBuilder.LocalDate(time, zone).DayOfYear - 1;
        }
        else
        {
            var s = time.UtcDateTime + zone.BaseUtcOffset;
            hour = s.Hour + s.Minute / 60.0;
            doy = s.DayOfYear - 1 + hour / 24;
        }

        row[0] = 1;
        Harmonics(2 * Math.PI * doy / YearDays, AnnualHarmonics, row[1..]);
        Harmonics(2 * Math.PI * hour / 24, DiurnalHarmonics, row[(1 + 2 * AnnualHarmonics)..]);
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
}
