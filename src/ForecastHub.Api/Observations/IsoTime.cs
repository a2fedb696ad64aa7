using System.Globalization;

namespace ForecastHub.Api.Observations;

/// <summary>
/// Strict ISO 8601 / RFC 3339 instants: <c>YYYY-MM-DDTHH:MM[:SS[.fraction]]</c> followed by
/// <c>Z</c> or an offset <c>+HH:MM</c> / <c>+HHMM</c> / <c>+HH</c> within ±14:00. Times without an
/// offset are refused because their instant is unknown. Fractions finer than a millisecond are
/// truncated (readings are stored to the millisecond).
/// </summary>
public static class IsoTime
{
    public const string Example = "2025-05-01T06:00:00+02:00";

    public static bool TryParse(ReadOnlySpan<char> text, out DateTimeOffset value, out string error)
    {
        var ok = TryParse(text, offsetRequired: true, out var local, out var offset, out error);
        value = ok ? new DateTimeOffset(local, offset!.Value) : default;
        return ok;
    }

    /// <summary>The same rules, but a time without an offset may be allowed: then <paramref name="offset"/>
    /// is null and <paramref name="local"/> is the wall-clock time as written (to the millisecond).</summary>
    public static bool TryParse(ReadOnlySpan<char> text, bool offsetRequired, out DateTime local, out TimeSpan? offset, out string error)
    {
        local = default;
        offset = null;
        error = "";
        var s = text.Trim();
        if (s.Length < 16 || !Digits(s, 0, 4, out var year) || s[4] != '-' || !Digits(s, 5, 2, out var month) || s[7] != '-'
            || !Digits(s, 8, 2, out var day) || (s[10] != 'T' && s[10] != 't' && s[10] != ' ')
            || !Digits(s, 11, 2, out var hour) || s[13] != ':' || !Digits(s, 14, 2, out var minute))
        {
            error = $"time is not an ISO 8601 date and time (expected e.g. {Example}).";
            return false;
        }
        var i = 16;
        var second = 0;
        long fractionTicks = 0;
        if (i < s.Length && s[i] == ':')
        {
            if (!Digits(s, i + 1, 2, out second))
            {
                error = $"time has malformed seconds (expected e.g. {Example}).";
                return false;
            }
            i += 3;
            if (i < s.Length && (s[i] == '.' || s[i] == ','))
            {
                var start = ++i;
                while (i < s.Length && char.IsAsciiDigit(s[i]))
                {
                    i++;
                }
                if (i == start || i - start > 9)
                {
                    error = "time has a malformed fraction of a second.";
                    return false;
                }
                var digits = s[start..Math.Min(i, start + 7)].ToString().PadRight(7, '0');
                fractionTicks = long.Parse(digits, CultureInfo.InvariantCulture);
            }
        }
        var hasOffset = offsetRequired || i < s.Length;
        var zoneOffset = TimeSpan.Zero;
        if (hasOffset && !TryOffset(s[i..], out zoneOffset, out error))
        {
            return false;
        }
        if (month is < 1 or > 12 || day < 1 || year < 1 || day > DateTime.DaysInMonth(year, month))
        {
            error = $"{s[..10]} is not a calendar date.";
            return false;
        }
        if (hour > 23 || minute > 59 || second > 59)
        {
            error = $"{s[11..Math.Min(s.Length, 19)]} is not a time of day (hours 00-23, minutes and seconds 00-59).";
            return false;
        }
        var written = new DateTime(year, month, day, hour, minute, second, DateTimeKind.Unspecified).AddTicks(fractionTicks);
        var utcTicks = written.Ticks - zoneOffset.Ticks;
        if (utcTicks < DateTimeOffset.MinValue.UtcTicks || utcTicks > DateTimeOffset.MaxValue.UtcTicks)
        {
            error = "time is outside the representable range.";
            return false;
        }
        local = written.AddTicks(-(utcTicks % TimeSpan.TicksPerMillisecond));
        offset = hasOffset ? zoneOffset : null;
        return true;
    }

    /// <summary>
    /// Fast path for the common shape <c>YYYY-MM-DDTHH:MM:SS[.f{1,9}](Z|+HH:MM|-HH:MM)</c> read straight
    /// from UTF-8 (years 0002-9998): the instant in UTC milliseconds, truncated like
    /// <see cref="TryParse(ReadOnlySpan{char}, out DateTimeOffset, out string)"/>. False for anything else, valid or not: the caller then runs the full
    /// parser, which owns every rejection and its message.
    /// </summary>
    public static bool TryParseCommonUtf8(ReadOnlySpan<byte> s, out long utcMs)
    {
        utcMs = 0;
        if (s.Length < 20 || s[4] != '-' || s[7] != '-' || s[10] != 'T' || s[13] != ':' || s[16] != ':'
            || !Digits(s, 0, 4, out var year) || !Digits(s, 5, 2, out var month) || !Digits(s, 8, 2, out var day)
            || !Digits(s, 11, 2, out var hour) || !Digits(s, 14, 2, out var minute) || !Digits(s, 17, 2, out var second))
        {
            return false;
        }
        var i = 19;
        var fractionMs = 0;
        if (s[i] == '.')
        {
            var start = ++i;
            while (i < s.Length && char.IsAsciiDigit((char)s[i]))
            {
                if (i - start < 3)
                {
                    fractionMs = (fractionMs * 10) + (s[i] - '0');
                }
                i++;
            }
            if (i == start || i - start > 9)
            {
                return false;
            }
            for (var k = i - start; k < 3; k++)
            {
                fractionMs *= 10;
            }
        }
        int offsetMinutes;
        if (i == s.Length - 1 && s[i] == 'Z')
        {
            offsetMinutes = 0;
        }
        else if (i == s.Length - 6 && (s[i] == '+' || s[i] == '-') && s[i + 3] == ':'
                 && Digits(s, i + 1, 2, out var offsetHours) && Digits(s, i + 4, 2, out var offsetMins)
                 && offsetMins <= 59 && (offsetHours < 14 || (offsetHours == 14 && offsetMins == 0)))
        {
            offsetMinutes = (s[i] == '-' ? -1 : 1) * ((offsetHours * 60) + offsetMins);
        }
        else
        {
            return false;
        }
        if (year is < 2 or > 9998 || month is < 1 or > 12 || day < 1 || day > DateTime.DaysInMonth(year, month)
            || hour > 23 || minute > 59 || second > 59)
        {
            return false;
        }
        var localMs = (new DateTime(year, month, day, hour, minute, second, DateTimeKind.Unspecified).Ticks - DateTime.UnixEpoch.Ticks)
            / TimeSpan.TicksPerMillisecond;
        utcMs = localMs + fractionMs - (offsetMinutes * 60_000L);
        return true;
    }

    /// <summary>The form every answer uses: UTC with milliseconds only when there are some.</summary>
    public static string Format(DateTimeOffset time) =>
        time.UtcDateTime.ToString(time.Millisecond == 0 ? "yyyy-MM-dd'T'HH:mm:ss'Z'" : "yyyy-MM-dd'T'HH:mm:ss.fff'Z'",
            CultureInfo.InvariantCulture);

    private static bool TryOffset(ReadOnlySpan<char> s, out TimeSpan offset, out string error)
    {
        offset = TimeSpan.Zero;
        error = "";
        if (s.Length == 0)
        {
            error = "time has no UTC offset: add 'Z' or an offset such as +02:00 (a time without one names no instant).";
            return false;
        }
        if (s is "Z" or "z")
        {
            return true;
        }
        var sign = s[0] switch { '+' => 1, '-' => -1, _ => 0 };
        var rest = s[1..];
        int hours = 0, minutes = 0;
        var ok = sign != 0 && rest.Length switch
        {
            2 => Digits(rest, 0, 2, out hours),
            4 => Digits(rest, 0, 2, out hours) && Digits(rest, 2, 2, out minutes),
            5 => Digits(rest, 0, 2, out hours) && rest[2] == ':' && Digits(rest, 3, 2, out minutes),
            _ => Fail(out hours),
        };
        if (!ok)
        {
            error = $"time has a malformed UTC offset '{Clip(s)}' (expected Z or e.g. +02:00).";
            return false;
        }
        if (hours > 14 || minutes > 59 || (hours == 14 && minutes > 0))
        {
            error = $"time offset '{Clip(s)}' is outside -14:00..+14:00.";
            return false;
        }
        offset = sign * new TimeSpan(hours, minutes, 0);
        return true;
    }

    private static bool Fail(out int value)
    {
        value = 0;
        return false;
    }

    private static bool Digits(ReadOnlySpan<char> s, int start, int count, out int value)
    {
        value = 0;
        if (start + count > s.Length)
        {
            return false;
        }
        for (var k = start; k < start + count; k++)
        {
            if (!char.IsAsciiDigit(s[k]))
            {
                return false;
            }
            value = (value * 10) + (s[k] - '0');
        }
        return true;
    }

    private static bool Digits(ReadOnlySpan<byte> s, int start, int count, out int value)
    {
        value = 0;
        for (var k = start; k < start + count; k++)
        {
            if (!char.IsAsciiDigit((char)s[k]))
            {
                return false;
            }
            value = (value * 10) + (s[k] - '0');
        }
        return true;
    }

    /// <summary>User text echoed in a message, cut short.</summary>
    public static string Clip(ReadOnlySpan<char> text) => text.Length <= 40 ? text.ToString() : $"{text[..40]}...";
}
