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

    public static (List<IncomingReading> Valid, List<RejectedReading> Rejected) Validate(
        IReadOnlyList<RawReading> rows, string defaultUnit, DateTimeOffset now)
    {
        var valid = new List<IncomingReading>(rows.Count);
        var rejected = new List<RejectedReading>();
        var latest = now + MaxAhead;
        foreach (var row in rows)
        {
            var reason = Check(row, defaultUnit, latest, out var reading);
            if (reason is null)
            {
                valid.Add(reading);
            }
            else
            {
                rejected.Add(new RejectedReading(row.Index, row.Line, Clip(row.Time), reason));
            }
        }
        return (valid, rejected);
    }

    public static string? Clip(string? time) => time is null ? null : IsoTime.Clip(time);

    private static string? Check(RawReading row, string defaultUnit, DateTimeOffset latest, out IncomingReading reading)
    {
        reading = default;
        if (row.Error is not null)
        {
            return row.Error;
        }
        if (!IsoTime.TryParse(row.Time, out var time, out var timeError))
        {
            return timeError;
        }
        return CheckRead(row.Index, time.ToUnixTimeMilliseconds(), row.Value!.Value, row.Unit ?? defaultUnit, latest, out reading);
    }

    /// <summary>The rules after the time has been read: at most <see cref="MaxAhead"/> past the clock
    /// (<paramref name="latest"/> = now + MaxAhead), a known unit, inside the physical range.</summary>
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
        if (celsius < SiteRules.PhysicalMinC || celsius > SiteRules.PhysicalMaxC)
        {
            return string.Create(CultureInfo.InvariantCulture,
                $"value {value} {unit} is {celsius:0.##} C, outside the physical range {SiteRules.PhysicalMinC}..{SiteRules.PhysicalMaxC} C; check the unit.");
        }
        reading = new IncomingReading(index, timeMs, celsius, value, unit);
        return null;
    }
}
