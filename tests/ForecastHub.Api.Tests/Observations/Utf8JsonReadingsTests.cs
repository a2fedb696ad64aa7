using System.Text;
using ForecastHub.Api.Observations;

namespace ForecastHub.Api.Tests.Observations;

/// <summary>The fast UTF-8 JSON reader either declines a body (the strict parser then answers) or
/// gives exactly the strict parser's outcome: the same valid readings, refused rows, reasons and
/// echoed times. Both run on the same bodies here, hostile ones included.</summary>
public sealed class Utf8JsonReadingsTests
{
    private static readonly DateTimeOffset Now = new(2025, 6, 1, 12, 0, 0, TimeSpan.Zero);

    private static string Row(string time, string value = "12.5", string? unit = null) =>
        $"{{\"time\":\"{time}\",\"value\":{value}{(unit is null ? "" : $",\"unit\":\"{unit}\"")}}}";

    private static byte[] Body(string? unit, params string[] rows) =>
        Encoding.UTF8.GetBytes($"{{{(unit is null ? "" : $"\"unit\":\"{unit}\",")}\"readings\":[{string.Join(",", rows)}]}}");

    /// <summary>Times the fast path must read itself, and times that go to the full parser (valid or not).</summary>
    public static TheoryData<string> Times => new()
    {
        "2025-05-31T10:00:00Z", "2025-05-31T10:00:00+02:00", "2025-05-31T10:00:00-05:30", "2025-05-31T10:00:00.5Z",
        "2025-05-31T10:00:00.123456789+14:00", "2025-05-31T23:59:59.999-14:00", "2024-02-29T00:00:00Z", "0002-01-01T00:00:00Z",
        "9998-12-31T23:59:59Z", "1969-12-31T23:59:59.999Z", "2025-06-01T12:10:00Z", "2025-06-01T12:10:00.001Z",
        "2025-02-30T10:00:00Z", "2025-05-31T25:00:00Z", "2025-05-31T10:60:00Z", "2025-05-31T10:00:60Z",
        "2025-05-31T10:00:00+25:00", "2025-05-31T10:00:00+14:01", "2025-05-31T10:00:00+02:60", "2025-05-31T10:00:00",
        "2025-05-31t10:00:00z", "2025-05-31 10:00:00Z", "2025-05-31T10:00:00,5Z", "2025-05-31T10:00:00+0200",
        "2025-05-31T10:00:00+02", "2025-05-31T10:00Z", " 2025-05-31T10:00:00Z ", "2025-05-31T10:00:00.Z",
        "2025-05-31T10:00:00.1234567890Z", "0001-01-01T00:00:00+01:00", "9999-12-31T23:59:59-01:00", "2025-13-01T00:00:00Z",
        "2025-00-10T00:00:00Z", "2025-05-00T00:00:00Z", "garbage", "", "2025-05-31T10:00:00Zjunk", "2025-05-31T10:00:00+02:00:00",
        "２０２５-05-31T10:00:00Z", "2025-05-31T10:00:00\u00a0Z",
    };

    [Theory]
    [MemberData(nameof(Times))]
    public void EachTimeGetsTheStrictParsersOutcome(string time)
    {
        foreach (var unit in new string?[] { null, "F" })
        {
            // A well-formed row with any time text stays on the fast path; the full parser judges the time.
            Assert.NotNull(Utf8JsonReadings.TryRead(Body(unit, Row(time)), null, Now, ObservationsEndpoints.MaxReadings));
            AssertSameAsStrict(Body(unit, Row(time), Row("2025-05-31T11:00:00Z", "13", "K")), queryUnit: null);
        }
    }

    public static TheoryData<string> RowBodies => new()
    {
        Row("2025-05-31T10:00:00Z", "1e400"),
        Row("2025-05-31T10:00:00Z", "-100"),
        Row("2025-05-31T10:00:00Z", "-3", "K"),
        Row("2025-05-31T10:00:00Z", "1", "R"),
        Row("2025-05-31T10:00:00Z", "1", "c"),
        Row("2025-05-31T10:00:00Z", "\"12\""),
        Row("2025-05-31T10:00:00Z", "null"),
        Row("2025-05-31T10:00:00Z", "NaN"),
        "{\"time\":1717000000,\"value\":12}",
        "{\"time\":\"2025-05-31T10:00:00Z\",\"value\":1,\"value\":99}",
        "{\"time\":\"2025-05-31T10:00:00Z\",\"value\":1,\"sensor\":1}",
        "{\"time\":\"2025-05-31T10:00:00Z\"}",
        "{\"value\":1}",
        "{\"time\":\"2025-05-31T10:00:00\\u005a\",\"value\":1}",
        "{\"time\":\"2025-05-31T10:00:00Z\",\"value\":1,\"unit\":null}",
        "12.5",
        "[]",
        "{\"time\":\"2025-05-31T10:00:00Z\",\"value\":1,\"extra\":{\"a\":1,\"a\":2}}",
    };

    [Theory]
    [MemberData(nameof(RowBodies))]
    public void EachRowShapeGetsTheStrictParsersOutcome(string row)
    {
        AssertSameAsStrict(Body(null, Row("2025-05-31T09:00:00Z"), row, Row("2025-05-31T11:00:00Z")), queryUnit: null);
    }

    public static TheoryData<string, string?> WholeBodies => new()
    {
        { "{\"unit\":\"F\",\"readings\":[" + Row("2025-05-31T10:00:00Z", "70") + "]}", null },
        { "{\"unit\":\"F\",\"readings\":[" + Row("2025-05-31T10:00:00Z", "70") + "]}", "F" },
        { "{\"unit\":\"F\",\"readings\":[" + Row("2025-05-31T10:00:00Z", "70") + "]}", "C" },
        { "{\"readings\":[" + Row("2025-05-31T10:00:00Z", "70") + "],\"unit\":\"F\"}", null },
        { "{\"unit\":null,\"readings\":[" + Row("2025-05-31T10:00:00Z", "20") + "]}", "K" },
        { "{\"unit\":\"X\",\"readings\":[" + Row("2025-05-31T10:00:00Z") + "]}", null },
        { "{\"unit\":\"C\",\"unit\":\"F\",\"readings\":[" + Row("2025-05-31T10:00:00Z") + "]}", null },
        { "{\"readings\":[" + Row("2025-05-31T10:00:00Z") + "]} trailing", null },
        { "{\"readings\":[" + Row("2025-05-31T10:00:00Z") + "]}  \r\n", null },
        { "{\"readings\":[" + Row("2025-05-31T10:00:00Z") + ",]}", null },
        { "{\"readings\":[" + Row("2025-05-31T10:00:00Z") + "]", null },
        { "{/* c */\"readings\":[" + Row("2025-05-31T10:00:00Z") + "]}", null },
        { "\uFEFF{\"readings\":[" + Row("2025-05-31T10:00:00Z") + "]}", null },
        { "{\"readings\":[]}", null },
        { "{\"readings\":\"many\"}", null },
        { "[1,2,3]", null },
        { "{\"readings\":" + new string('[', 5000) + new string(']', 5000) + "}", null },
        { "", null },
    };

    [Theory]
    [MemberData(nameof(WholeBodies))]
    public void EachBodyShapeGetsTheStrictParsersOutcome(string body, string? queryUnit)
    {
        AssertSameAsStrict(Encoding.UTF8.GetBytes(body), queryUnit);
    }

    [Fact]
    public void TheUsualBodyTakesTheFastPath()
    {
        var rows = Enumerable.Range(0, 500).Select(i => Row($"2025-05-{1 + (i / 24):00}T{i % 24:00}:00:00Z", $"{10 + (i % 7)}.25")).ToArray();
        var body = Body("C", rows);

        var fast = Utf8JsonReadings.TryRead(body, null, Now, ObservationsEndpoints.MaxReadings);

        Assert.NotNull(fast);
        Assert.Equal(500, fast.Valid.Count);
        AssertSameAsStrict(body, null);
    }

    [Fact]
    public void MoreReadingsThanTheLimitGoToTheStrictPathAndItsTooLargeProblem()
    {
        var body = Body(null, Enumerable.Range(0, 11).Select(i => Row($"2025-05-31T{i:00}:00:00Z")).ToArray());

        Assert.Null(Utf8JsonReadings.TryRead(body, null, Now, maxReadings: 10));
        Assert.NotNull(Utf8JsonReadings.TryRead(body, null, Now, maxReadings: 11));
    }

    [Fact]
    public void MutatedTimesReadByTheFastPathMatchTheFullParser()
    {
        var random = new Random(11);
        const string alphabet = "0123456789-:+TZz.,t ";
        for (var n = 0; n < 20_000; n++)
        {
            var chars = "2025-05-31T10:00:00.250+02:00".ToCharArray().ToList();
            for (var edits = random.Next(1, 3); edits > 0; edits--)
            {
                var at = random.Next(chars.Count);
                switch (random.Next(3))
                {
                    case 0:
                        chars[at] = alphabet[random.Next(alphabet.Length)];
                        break;
                    case 1:
                        chars.RemoveAt(at);
                        break;
                    default:
                        chars.Insert(at, alphabet[random.Next(alphabet.Length)]);
                        break;
                }
            }
            var text = new string([.. chars]);
            if (IsoTime.TryParseCommonUtf8(Encoding.UTF8.GetBytes(text), out var fastMs))
            {
                Assert.True(IsoTime.TryParse(text, out var full, out _), text);
                Assert.Equal(full.ToUnixTimeMilliseconds(), fastMs);
            }
        }
    }

    private static void AssertSameAsStrict(byte[] body, string? queryUnit)
    {
        var fast = Utf8JsonReadings.TryRead(body, queryUnit, Now, ObservationsEndpoints.MaxReadings);
        var (strict, problem) = ObservationsEndpoints.ReadJsonStrict(body, queryUnit, Now);
        if (fast is null)
        {
            return;
        }
        Assert.Null(problem);
        Assert.Equal(strict!.Count, fast.Count);
        Assert.Equal(strict.Valid, fast.Valid);
        Assert.Equal(strict.Rejected, fast.Rejected);
        Assert.Equal(Enumerable.Range(0, strict.Count).Select(strict.TimeText), Enumerable.Range(0, fast.Count).Select(fast.TimeText));
    }
}
