using System.Globalization;
using System.Text;

namespace ForecastHub.Api.Observations;

/// <summary>
/// Strict CSV (RFC 4180): UTF-8 with or without BOM, CRLF or LF line ends, a required header
/// <c>time,value</c> or <c>time,value,unit</c> (any case), comma separators, fields optionally in
/// double quotes with <c>""</c> for a quote; a quoted field may hold line breaks, which then belong
/// to the field. Blank lines are skipped. A bad row is refused alone, with the line number its record
/// starts on; a bad header or non-text body refuses the whole body.
/// </summary>
internal static class CsvReadings
{
    private static readonly UTF8Encoding StrictUtf8 = new(encoderShouldEmitUTF8Identifier: false, throwOnInvalidBytes: true);

    public static (List<RawReading>? Rows, string? Error, bool TooMany) Parse(byte[] body, int maxReadings)
    {
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
        var records = Records(text);
        var header = records[0].Text;
        var headerError = CheckHeader(header, out var columns);
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
            rows.Add(ParseRow(record, rows.Count, line, columns));
        }
        return (rows, null, false);
    }

    // The records of the body (each without its line end) and the line each starts on. A line break
    // ends a record unless it is inside a quoted field, which opens only at the start of a field.
    private static List<(string Text, int Line)> Records(string text)
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
            fieldStart = c is ',' or '\n';
        }
        records.Add((text[start..].TrimEnd('\r'), startLine));
        return records;
    }

    private static string? CheckHeader(string header, out int columns)
    {
        columns = 0;
        var fields = SplitFields(header, out _);
        var names = fields?.Select(f => f.Trim().ToLowerInvariant()).ToArray();
        if (names is ["time", "value"] or ["time", "value", "unit"])
        {
            columns = names.Length;
            return null;
        }
        if (header.Contains(';', StringComparison.Ordinal) && !header.Contains(',', StringComparison.Ordinal))
        {
            return "Line 1: the CSV is separated by ';'. Use ',' between fields (and '.' as the decimal point).";
        }
        return $"Line 1 must be the header 'time,value' or 'time,value,unit'; found '{IsoTime.Clip(header)}'.";
    }

    private static RawReading ParseRow(string line, int index, int lineNumber, int columns)
    {
        var fields = SplitFields(line, out var splitError);
        if (fields is null)
        {
            return new RawReading(index, lineNumber, null, null, null, splitError);
        }
        var time = fields.Count > 0 ? fields[0].Trim() : null;
        if (fields.Count != columns)
        {
            return new RawReading(index, lineNumber, time, null, null,
                $"expected {columns} fields (as in the header), found {fields.Count}.");
        }
        var valueText = fields[1].Trim();
        var unit = columns == 3 && fields[2].Trim().Length > 0 ? fields[2].Trim() : null;
        if (!double.TryParse(valueText, NumberStyles.AllowLeadingSign | NumberStyles.AllowDecimalPoint | NumberStyles.AllowExponent,
                CultureInfo.InvariantCulture, out var value))
        {
            return new RawReading(index, lineNumber, time, null, unit, $"value '{IsoTime.Clip(valueText)}' is not a number.");
        }
        if (!double.IsFinite(value))
        {
            return new RawReading(index, lineNumber, time, null, unit, "value is not a finite number.");
        }
        return new RawReading(index, lineNumber, time, value, unit, null);
    }

    // Fields of one record; null with an error when a quoted field is not closed properly.
    private static List<string>? SplitFields(string line, out string? error)
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
                if (i < line.Length && line[i] != ',')
                {
                    error = "text follows a closing quote; quote the whole field.";
                    return null;
                }
            }
            else
            {
                while (i < line.Length && line[i] != ',')
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
            i++; // the comma
        }
    }
}
