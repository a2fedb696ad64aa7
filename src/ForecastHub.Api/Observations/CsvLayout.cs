using System.Globalization;

namespace ForecastHub.Api.Observations;

/// <summary>
/// How an exported CSV file is laid out: which columns hold the time, the value and (optionally)
/// the unit, by header name (any case) or 1-based position; the field separator (<c>,</c> <c>;</c>
/// or tab) and the decimal mark (<c>.</c> or <c>,</c>). A header line is always required; other
/// columns are ignored. The defaults read <c>time,value[,unit]</c>.
/// </summary>
public sealed record CsvLayout(string TimeColumn, string ValueColumn, string? UnitColumn, char Separator, char DecimalMark)
{
    public const string DefaultTimeColumn = "time";
    public const string DefaultValueColumn = "value";
    public const string DefaultUnitColumn = "unit";

    public static readonly CsvLayout Default = new(DefaultTimeColumn, DefaultValueColumn, null, ',', '.');

    /// <summary>The layout from the request's (or the command line's) words; the error names the bad field.</summary>
    public static (CsvLayout? Layout, string? Field, string? Error) From(string? timeColumn, string? valueColumn, string? unitColumn,
        string? separator, string? decimalMark)
    {
        char sep = ',', dec = '.';
        if (separator is not null && !TrySeparator(separator, out sep))
        {
            return (null, "separator", $"separator must be ',', ';' or 'tab' (also 'comma', 'semicolon'), not '{IsoTime.Clip(separator)}'.");
        }
        if (decimalMark is not null && !TryDecimal(decimalMark, out dec))
        {
            return (null, "decimal", $"decimal must be '.' or ',' (also 'point', 'comma'), not '{IsoTime.Clip(decimalMark)}'.");
        }
        if (sep == dec)
        {
            return (null, "decimal", "the decimal mark cannot be the field separator; exports with decimal commas use ';' or tab between fields (separator=;).");
        }
        foreach (var (field, column) in new[] { ("timeColumn", timeColumn), ("valueColumn", valueColumn), ("unitColumn", unitColumn) })
        {
            if (column is not null && column.Trim().Length == 0)
            {
                return (null, field, $"{field} must name a header column or give its 1-based position.");
            }
        }
        return (new CsvLayout(timeColumn?.Trim() ?? DefaultTimeColumn, valueColumn?.Trim() ?? DefaultValueColumn, unitColumn?.Trim(), sep, dec), null, null);
    }

    private static bool TrySeparator(string text, out char separator)
    {
        separator = text.ToLowerInvariant() switch
        {
            "," or "comma" => ',',
            ";" or "semicolon" => ';',
            "\t" or "tab" or "\\t" => '\t',
            _ => '\0',
        };
        return separator != '\0';
    }

    private static bool TryDecimal(string text, out char mark)
    {
        mark = text.ToLowerInvariant() switch
        {
            "." or "point" => '.',
            "," or "comma" => ',',
            _ => '\0',
        };
        return mark != '\0';
    }

    /// <summary>The 0-based index of a column given by name or 1-based position; -1 when the header has no such column.</summary>
    public static int Find(string column, IReadOnlyList<string> header)
    {
        ArgumentNullException.ThrowIfNull(column);
        ArgumentNullException.ThrowIfNull(header);
        if (column.All(char.IsAsciiDigit) && int.TryParse(column, NumberStyles.None, CultureInfo.InvariantCulture, out var position))
        {
            return position >= 1 && position <= header.Count ? position - 1 : -1;
        }
        for (var i = 0; i < header.Count; i++)
        {
            if (string.Equals(header[i].Trim(), column, StringComparison.OrdinalIgnoreCase))
            {
                return i;
            }
        }
        return -1;
    }
}
