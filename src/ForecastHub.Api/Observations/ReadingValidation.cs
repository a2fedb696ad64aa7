using System.Globalization;
using ForecastHub.Api.Sites;
using ForecastHub.Storage.Readings;

namespace ForecastHub.Api.Observations;

/// <summary>The per-row rules of DESIGN section 5: a time with an offset and at most ten minutes
/// ahead of the server clock, a finite value in a known unit, inside -95..+65 C after conversion.</summary>
internal static class ReadingValidation
{
    public static readonly TimeSpan MaxAhead = TimeSpan.FromMinutes(10);

    /// <summary>The earliest reading time stored; an earlier one is almost always a broken clock or a missing year.</summary>
    public static readonly DateTimeOffset Earliest = new(1800, 1, 1, 0, 0, 0, TimeSpan.Zero);

    /// <summary>The row rules; with <paramref name="localZone"/>, times without an offset are read in that zone
    /// (<see cref="LocalTimes"/>). <c>Impossible</c>: the values of rows in degrees C refused for the physical range.</summary>
    public static (List<IncomingReading> Valid, List<RejectedReading> Rejected, List<double> ImpossibleCelsius) Validate(
        IReadOnlyList<RawReading> rows, string defaultUnit, DateTimeOffset now, TimeZoneInfo? localZone = null)
    {
        var valid = new List<IncomingReading>(rows.Count);
        var rejected = new List<RejectedReading>();
        var impossible = new List<double>();
        var latest = now + MaxAhead;
        var local = localZone is null ? null : new LocalTimes(localZone, rows.Select(r => r.Error is null ? r.Time : null));
        foreach (var row in rows)
        {
            var reason = Check(row, defaultUnit, latest, local, out var reading);
            if (reason is null)
            {
                valid.Add(reading);
                continue;
            }
            rejected.Add(new RejectedReading(row.Index, row.Line, Clip(row.Time), reason));
            if (reading.OriginalUnit == TemperatureUnits.Celsius)
            {
                impossible.Add(reading.OriginalValue);
            }
        }
        return (valid, rejected, impossible);
    }

    /// <summary>The value as sent and, when the unit is not C, as converted; and which other unit would put it in range.</summary>
    private static string OutsidePhysicalRange(double value, string unit, double celsius)
    {
        var sent = string.Create(CultureInfo.InvariantCulture, $"value {value:0.###} {unit}");
        var converted = unit == TemperatureUnits.Celsius ? sent : string.Create(CultureInfo.InvariantCulture, $"{sent} ({celsius:0.##} C)");
        // From C the mix-ups are F and K; from F or K, C.
        string[] candidates = unit == TemperatureUnits.Celsius ? [TemperatureUnits.Fahrenheit, TemperatureUnits.Kelvin] : [TemperatureUnits.Celsius];
        var other = candidates
            .Select(u => (Unit: u, C: TemperatureUnits.ToCelsius(value, u)))
            .FirstOrDefault(x => x.C >= SiteRules.PhysicalMinC && x.C <= SiteRules.PhysicalMaxC);
        var hint = other.Unit is null ? "check the unit" : string.Create(CultureInfo.InvariantCulture, $"check the unit: as {other.Unit} it would be {other.C:0.##} C");
        return string.Create(CultureInfo.InvariantCulture,
            $"{converted} is outside the physical range {SiteRules.PhysicalMinC}..{SiteRules.PhysicalMaxC} C; {hint}.");
    }

    public static string? Clip(string? time) => time is null ? null : IsoTime.Clip(time);

    private static string? Check(RawReading row, string defaultUnit, DateTimeOffset latest, LocalTimes? local, out IncomingReading reading)
    {
        reading = default;
        if (row.Error is not null)
        {
            return row.Error;
        }
        DateTimeOffset time;
        string timeError;
        if (local is null ? !IsoTime.TryParse(row.Time, out time, out timeError) : !local.TryRead(row.Time, out time, out timeError))
        {
            return timeError;
        }
        return CheckRead(row.Index, time.ToUnixTimeMilliseconds(), row.Value!.Value, row.Unit ?? defaultUnit, latest, out reading);
    }

    /// <summary>The rules after the time has been read: at most <see cref="MaxAhead"/> past the clock
    /// (<paramref name="latest"/> = now + MaxAhead), a known unit, inside the physical range. A reading
    /// refused for the range is still returned in <paramref name="reading"/>, for the batch's unit check.</summary>
    public static string? CheckRead(int index, long timeMs, double value, string unit, DateTimeOffset latest, out IncomingReading reading)
    {
        reading = default;
        if ((timeMs * TimeSpan.TicksPerMillisecond) + DateTime.UnixEpoch.Ticks > latest.UtcTicks)
        {
            return string.Create(CultureInfo.InvariantCulture,
                $"time is more than {MaxAhead.TotalMinutes} minutes ahead of the server clock ({IsoTime.Format(latest - MaxAhead)}); check the logger's clock and offset.");
        }
        if (timeMs < Earliest.ToUnixTimeMilliseconds())
        {
            return "time is before 1800-01-01T00:00:00Z, the earliest time stored; check the year and the logger's clock.";
        }
        if (!TemperatureUnits.IsKnown(unit))
        {
            return $"unit '{IsoTime.Clip(unit)}' is not known: {TemperatureUnits.UnknownUnitMessage}";
        }
        var celsius = TemperatureUnits.ToCelsius(value, unit);
        reading = new IncomingReading(index, timeMs, celsius, value, unit);
        if (celsius < SiteRules.PhysicalMinC || celsius > SiteRules.PhysicalMaxC)
        {
            return OutsidePhysicalRange(value, unit, celsius);
        }
        return null;
    }
}
