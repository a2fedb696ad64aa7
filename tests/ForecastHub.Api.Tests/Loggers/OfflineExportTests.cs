using System.Globalization;
using System.Text;
using System.Text.Json;
using ForecastHub.Api.CommandLine;
using ForecastHub.Api.Demo;
using Microsoft.Extensions.Time.Testing;

namespace ForecastHub.Api.Tests.Loggers;

/// <summary>The offline verbs on files as loggers export them: the unit check, local times, other
/// layouts, every rejected line reported, a JSON report even without a model, the warming-up rule.</summary>
public sealed class OfflineExportTests : IDisposable
{
    private static readonly DateTimeOffset Now = new(2025, 3, 10, 9, 30, 0, TimeSpan.Zero);
    private readonly string folder = Path.Combine(Path.GetTempPath(), "forecasthub-export-" + Guid.NewGuid().ToString("N"));

    public OfflineExportTests() => Directory.CreateDirectory(folder);

    public void Dispose() => Directory.Delete(folder, recursive: true);

    private static IEnumerable<(DateTimeOffset Time, double ValueC)> Demo(int days) =>
        DemoSeriesGenerator.Generate(Now).Single(s => s.Site.Id == "ambrel-low").Readings.TakeLast(days * 24).Select(r => (r.Time, r.ValueC));

    private string Write(string name, string text)
    {
        var path = Path.Combine(folder, name);
        File.WriteAllText(path, text);
        return path;
    }

    private static async Task<(int Code, string Output, string Errors)> Run(params string[] args)
    {
        using var output = new StringWriter(CultureInfo.InvariantCulture);
        using var errors = new StringWriter(CultureInfo.InvariantCulture);
        var code = await OfflineVerbs.RunAsync(args, output, errors, new FakeTimeProvider(Now));
        return (code, output.ToString(), errors.ToString());
    }

    private static string Iso(DateTimeOffset time) => time.ToString("yyyy-MM-dd'T'HH:mm:sszzz", CultureInfo.InvariantCulture);

    private static string F(double valueC) => (valueC * 9 / 5 + 32 + 40).ToString("0.0", CultureInfo.InvariantCulture);

    [Fact]
    public async Task AFahrenheitFileWithoutAUnitIsRefusedWithTheHintAndAReportUnlessTheUnitIsGiven()
    {
        // A warm summer site in Fahrenheit (the winter demo series lifted by 40 F): read as C, no plausible air temperature.
        var text = new StringBuilder("time,value\n");
        foreach (var (time, valueC) in Demo(60))
        {
            text.Append(Iso(time)).Append(',').Append(F(valueC)).Append('\n');
        }
        var csv = Write("fahrenheit.csv", text.ToString());

        var (refusedCode, refusedOutput, refusedErrors) = await Run("fit", csv);
        using var refusedReport = JsonDocument.Parse(await File.ReadAllTextAsync(Path.Combine(folder, "fahrenheit.fit.json")));
        var (code, output, errors) = await Run("fit", csv, "--unit", "F", "--test-days", "3");

        Assert.Equal(2, refusedCode);
        Assert.Equal("", refusedOutput);
        Assert.Contains("send --unit F", refusedErrors, StringComparison.Ordinal);
        Assert.Contains("send --unit F", refusedReport.RootElement.GetProperty("error").GetString(), StringComparison.Ordinal);
        Assert.Equal(JsonValueKind.Null, refusedReport.RootElement.GetProperty("model").ValueKind);
        Assert.True(code == 0, errors);
        Assert.Contains("1440 readings used, 0 rejected", output, StringComparison.Ordinal);
    }

    [Fact]
    public async Task ALocalTimeSemicolonExportIsFittedInItsZone()
    {
        var london = TimeZoneInfo.FindSystemTimeZoneById("Europe/London");
        var text = new StringBuilder("Zeitpunkt;Temperatur;Status\n");
        foreach (var (time, valueC) in Demo(60))
        {
            var local = TimeZoneInfo.ConvertTime(time, london);
            text.Append(local.ToString("yyyy-MM-dd HH:mm", CultureInfo.InvariantCulture)).Append(';')
                .Append(valueC.ToString("0.00", CultureInfo.InvariantCulture).Replace('.', ',')).Append(";ok\n");
        }
        var csv = Write("local.csv", text.ToString());

        var (code, output, errors) = await Run("fit", csv, "--separator", ";", "--decimal", ",", "--time-column", "Zeitpunkt",
            "--value-column", "2", "--local-times", "--time-zone", "Europe/London", "--test-days", "3");

        Assert.True(code == 0, errors);
        Assert.Contains("1440 readings used, 0 rejected", output, StringComparison.Ordinal);
    }

    [Fact]
    public async Task LocalTimesWithoutAZoneAreRefused()
    {
        var (code, _, errors) = await Run("fit", Write("x.csv", "time,value\n"), "--local-times");

        Assert.Equal(2, code);
        Assert.Contains("--time-zone", errors, StringComparison.Ordinal);
    }

    [Fact]
    public async Task EveryRejectedLineIsCountedAndTheFirstTwentyAreShown()
    {
        var text = new StringBuilder("time,value\n");
        foreach (var (time, valueC) in Demo(30))
        {
            text.Append(Iso(time)).Append(',').Append(valueC.ToString(CultureInfo.InvariantCulture)).Append('\n');
        }
        for (var i = 0; i < 25; i++)
        {
            text.Append("2025-02-30T10:00:00+00:00,").Append(i).Append('\n');
        }
        var csv = Write("bad.csv", text.ToString());

        var (code, output, errors) = await Run("fit", csv, "--test-days", "3");

        Assert.True(code == 0, errors);
        Assert.Equal(20, output.Split('\n').Count(l => l.Contains("is not a calendar date", StringComparison.Ordinal)));
        Assert.Contains("... and 5 more rejected rows (25 in all", output, StringComparison.Ordinal);
    }

    [Fact]
    public async Task ThreeDaysAreWarmingUpAsInTheServiceAndTheReportSaysSo()
    {
        var text = new StringBuilder("time,value\n");
        foreach (var (time, valueC) in Demo(3))
        {
            text.Append(Iso(time)).Append(',').Append(valueC.ToString(CultureInfo.InvariantCulture)).Append('\n');
        }
        text.Append("not a time,1\n");
        var csv = Write("short.csv", text.ToString());

        var (code, output, errors) = await Run("fit", csv);

        Assert.Equal(2, code);
        Assert.Equal("", output);
        Assert.Contains("72 hourly grid points; the service fits a site from 168 on", errors, StringComparison.Ordinal);
        Assert.Contains("line 74: time is not an ISO 8601", errors, StringComparison.Ordinal);
        using var report = JsonDocument.Parse(await File.ReadAllTextAsync(Path.Combine(folder, "short.fit.json")));
        Assert.Equal("warming-up", report.RootElement.GetProperty("health").GetString());
        Assert.Equal(1, report.RootElement.GetProperty("input").GetProperty("rejected").GetArrayLength());
    }

    [Fact]
    public async Task AFileWithNoUsableReadingStillGetsAReportWithTheReasons()
    {
        var csv = Write("naive.csv", "time,value\n2025-03-01 10:00,1\n2025-03-01 11:00,2\n");

        var (code, _, errors) = await Run("fit", csv);

        Assert.Equal(2, code);
        Assert.Contains("no usable reading (2 rows rejected", errors, StringComparison.Ordinal);
        Assert.Contains("line 2: time has no UTC offset", errors, StringComparison.Ordinal);
        using var report = JsonDocument.Parse(await File.ReadAllTextAsync(Path.Combine(folder, "naive.fit.json")));
        Assert.Equal(2, report.RootElement.GetProperty("input").GetProperty("rejected").GetArrayLength());
    }
}
