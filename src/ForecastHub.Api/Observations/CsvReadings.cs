using System.Globalization;
using System.Text;

namespace ForecastHub.Api.Observations;

/// <summary>
/// Strict CSV (RFC 4180): UTF-8 with or without BOM, CRLF or LF line ends, a required header line,
/// fields separated as the <see cref="CsvLayout"/> says (default comma), optionally in double quotes
/// with <c>""</c> for a quote; a quoted field may hold line breaks, which then belong to the field.
/// The layout names the time, value and unit columns (default <c>time</c>, <c>value</c> and an
/// optional <c>unit</c>); other columns are ignored, and every row has as many fields as the header.
/// Blank lines are skipped. A bad row is refused alone, with the line number its record starts on;
/// a bad header or non-text body refuses the whole body.
/// </summary>
internal static class CsvReadings
{
    private static readonly UTF8Encoding StrictUtf8 = new(encoderShouldEmitUTF8Identifier: false, throwOnInvalidBytes: true);

    private readonly record struct Columns(int Time, int Value, int Unit, int Count);

    public static (List<RawReading>? Rows, string? Error, bool TooMany) Parse(byte[] body, int maxReadings, CsvLayout? layout = null)
    {
        layout ??= CsvLayout.Default;
        string text;
        try
        {
            text = StrictUtf8.GetString(body);
        }
        catch (DecoderFallbackException)
        {
            return (null, "The body is not UTF-8 text; send CSV as UTF-8.", false);
        }
        if (text.Length > 0 && text[0] == '\uFEFF')
        {
            text = text[1..];
        }
        if (text.Contains('\0', StringComparison.Ordinal))
        {
            return (null, "The body contains NUL characters; it is not CSV text.", false);
        }
        var records = Records(text, layout.Separator);
        var header = records[0].Text;
        var headerError = CheckHeader(header, layout, out var columns);
        if (headerError is not null)
        {
            return (null, headerError, false);
        }
        var rows = new List<RawReading>();
        foreach (var (record, line) in records.Skip(1))
        {
            if (record.Trim().Length == 0)
            {
                continue;
            }
            if (rows.Count == maxReadings)
            {
                return (null, $"More than {maxReadings} readings in one request.", true);
            }
            rows.Add(ParseRow(record, rows.Count, line, columns, layout));
        }
        return (rows, null, false);
    }

    // The records of the body (each without its line end) and the line each starts on. A line break
    // ends a record unless it is inside a quoted field, which opens only at the start of a field.
    internal static List<(string Text, int Line)> Records(string text, char separator)
    {
        var records = new List<(string, int)>();
        int start = 0, line = 1, startLine = 1;
        bool quoted = false, fieldStart = true;
        for (var i = 0; i < text.Length; i++)
        {
            var c = text[i];
            if (quoted)
            {
                if (c == '"' && i + 1 < text.Length && text[i + 1] == '"')
                {
                    i++; // a doubled quote stays inside the field
                }
                else if (c == '"')
                {
                    quoted = false;
                }
                else if (c == '\n')
                {
                    line++;
                }
                continue;
            }
            if (c == '"' && fieldStart)
            {
                quoted = true;
            }
            else if (c == '\n')
            {
                records.Add((text[start..i].TrimEnd('\r'), startLine));
                start = i + 1;
                startLine = ++line;
            }
            fieldStart = c == separator || c == '\n';
        }
        records.Add((text[start..].TrimEnd('\r'), startLine));
        return records;
    }

    private static string? CheckHeader(string header, CsvLayout layout, out Columns columns)
    {
        columns = default;
        var fields = SplitFields(header, layout.Separator, out _);
        if (fields is null || fields.Count == 0 || header.Trim().Length == 0)
        {
            return "Line 1 must be a header line naming the columns (for example 'time,value').";
        }
        var time = CsvLayout.Find(layout.TimeColumn, fields);
        var value = CsvLayout.Find(layout.ValueColumn, fields);
        var unit = layout.UnitColumn is { } u ? CsvLayout.Find(u, fields) : CsvLayout.Find(CsvLayout.DefaultUnitColumn, fields);
        if (time >= 0 && value >= 0 && (unit >= 0 || layout.UnitColumn is null) && time != value && time != unit && value != unit)
        {
            columns = new Columns(time, value, unit, fields.Count);
            return null;
        }
        if (fields.Count == 1 && layout.Separator == ',' && header.Contains(';', StringComparison.Ordinal))
        {
            return "Line 1: the CSV is separated by ';'; say so with separator=; (and decimal=, for decimal commas).";
        }
        if (fields.Count == 1 && layout.Separator == ',' && header.Contains('\t', StringComparison.Ordinal))
        {
            return "Line 1: the CSV is separated by tabs; say so with separator=tab.";
        }
        var missing = time < 0 ? ("timeColumn", layout.TimeColumn) : value < 0 ? ("valueColumn", layout.ValueColumn) : unit < 0 ? ("unitColumn", layout.UnitColumn!) : default;
        var names = string.Join(", ", fields.Select(f => $"'{IsoTime.Clip(f.Trim())}'"));
        return missing.Item1 is null
            ? $"Line 1: the time, value and unit columns must be three different columns; the header has {names}."
            : $"Line 1: the header has no column '{IsoTime.Clip(missing.Item2)}' ({missing.Item1}); it has {names}. Name the column or give its 1-based position.";
    }

    private static RawReading ParseRow(string line, int index, int lineNumber, Columns columns, CsvLayout layout)
    {
        var fields = SplitFields(line, layout.Separator, out var splitError);
        if (fields is null)
        {
            return new RawReading(index, lineNumber, null, null, null, splitError);
        }
        var time = fields.Count > columns.Time ? fields[columns.Time].Trim() : null;
        if (fields.Count != columns.Count)
        {
            return new RawReading(index, lineNumber, time, null, null,
                $"expected {columns.Count} fields (as in the header), found {fields.Count}.");
        }
        var valueText = fields[columns.Value].Trim();
        var unit = columns.Unit >= 0 && fields[columns.Unit].Trim().Length > 0 ? TemperatureUnits.Normalise(fields[columns.Unit].Trim()) : null;
        if (layout.DecimalMark == ',')
        {
            if (valueText.Contains('.', StringComparison.Ordinal))
            {
                return new RawReading(index, lineNumber, time, null, unit, $"value '{IsoTime.Clip(valueText)}' has a '.', but the decimal mark is ','.");
            }
            valueText = valueText.Replace(',', '.');
        }
        if (!double.TryParse(valueText, NumberStyles.AllowLeadingSign | NumberStyles.AllowDecimalPoint | NumberStyles.AllowExponent,
                CultureInfo.InvariantCulture, out var value))
        {
            return new RawReading(index, lineNumber, time, null, unit, $"value '{IsoTime.Clip(fields[columns.Value].Trim())}' is not a number.");
        }
        if (!double.IsFinite(value))
        {
            return new RawReading(index, lineNumber, time, null, unit, "value is not a finite number.");
        }
        return new RawReading(index, lineNumber, time, value, unit, null);
    }

    // Fields of one record; null with an error when a quoted field is not closed properly.
    private static List<string>? SplitFields(string line, char separator, out string? error)
    {
        error = null;
        var fields = new List<string>(3);
        var field = new StringBuilder();
        var i = 0;
        while (true)
        {
            field.Clear();
            if (i < line.Length && line[i] == '"')
            {
                i++;
                while (true)
                {
                    if (i >= line.Length)
                    {
                        error = "a quoted field is not closed (its closing quote is missing).";
                        return null;
                    }
                    if (line[i] == '"')
                    {
                        if (i + 1 < line.Length && line[i + 1] == '"')
                        {
                            field.Append('"');
                            i += 2;
                            continue;
                        }
                        i++;
                        break;
                    }
                    field.Append(line[i++]);
                }
                if (i < line.Length && line[i] != separator)
                {
                    error = "text follows a closing quote; quote the whole field.";
                    return null;
                }
            }
            else
            {
                while (i < line.Length && line[i] != separator)
                {
                    if (line[i] == '"')
                    {
                        error = "a quote inside an unquoted field; quote the whole field and double the quote.";
                        return null;
                    }
                    field.Append(line[i++]);
                }
            }
            fields.Add(field.ToString());
            if (i >= line.Length)
            {
                return fields;
            }
            i++; // the separator
        }
    }
}
