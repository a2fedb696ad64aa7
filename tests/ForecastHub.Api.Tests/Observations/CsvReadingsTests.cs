using System.Text;
using ForecastHub.Api.Observations;

namespace ForecastHub.Api.Tests.Observations;

/// <summary>RFC 4180 records: a line break inside a quoted field belongs to the field, and a row's
/// line number is the line its record starts on.</summary>
public sealed class CsvReadingsTests
{
    private static List<RawReading> Rows(string csv)
    {
        var (rows, error, _) = CsvReadings.Parse(Encoding.UTF8.GetBytes(csv), ObservationsEndpoints.MaxReadings);
        Assert.Null(error);
        return rows!;
    }

    [Fact]
    public void AQuotedFieldMayHoldLineBreaksAndLinesCountFromTheRecordsFirstLine()
    {
        var rows = Rows("time,value\r\n"
            + "\"2025-05-31T10:00:00Z\r\n\",12.5\r\n"
            + "2025-05-31T11:00:00Z,\"not\na number\"\r\n"
            + "2025-05-31T12:00:00Z,\"1\"\"2\"\r\n"
            + "2025-05-31T13:00:00Z,13\r\n");

        Assert.Equal([2, 4, 6, 7], rows.Select(r => r.Line));
        Assert.Equal(("2025-05-31T10:00:00Z", 12.5, (string?)null), (rows[0].Time, rows[0].Value, rows[0].Error));
        Assert.Equal("value 'not\na number' is not a number.", rows[1].Error);
        Assert.Equal("value '1\"2' is not a number.", rows[2].Error);
        Assert.Equal((13.0, (string?)null), (rows[3].Value, rows[3].Error));
    }

    [Fact]
    public void AnUnclosedQuoteRefusesOneRecordAtTheLineItStarts()
    {
        var rows = Rows("time,value\n2025-05-31T10:00:00Z,1\n\"2025-05-31T11:00:00Z,2\n2025-05-31T12:00:00Z,3\n");

        Assert.Equal(2, rows.Count);
        Assert.Null(rows[0].Error);
        Assert.Equal((3, "a quoted field is not closed (its closing quote is missing)."), (rows[1].Line, rows[1].Error));
    }

    [Fact]
    public void AQuoteInsideAnUnquotedFieldOpensNothingAndTheNextLineIsItsOwnRecord()
    {
        var rows = Rows("time,value\n2025-05-31T10:00:00Z,1\"2\n2025-05-31T11:00:00Z,3\n\n2025-05-31T12:00:00Z,4");

        Assert.Equal([2, 3, 5], rows.Select(r => r.Line));
        Assert.Equal("a quote inside an unquoted field; quote the whole field and double the quote.", rows[0].Error);
        Assert.Equal([3.0, 4.0], rows.Skip(1).Select(r => r.Value!.Value));
    }
}
