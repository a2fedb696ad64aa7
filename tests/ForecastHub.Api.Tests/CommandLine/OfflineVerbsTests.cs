using System.Globalization;
using System.Text;
using System.Text.Json;
using ForecastHub.Api.CommandLine;
using ForecastHub.Api.Demo;
using Microsoft.Extensions.Time.Testing;

namespace ForecastHub.Api.Tests.CommandLine;

public sealed class OfflineVerbsTests : IDisposable
{
    private static readonly DateTimeOffset Now = new(2025, 3, 10, 9, 30, 0, TimeSpan.Zero);
    private readonly string folder = Path.Combine(Path.GetTempPath(), "forecasthub-cli-" + Guid.NewGuid().ToString("N"));

    public OfflineVerbsTests() => Directory.CreateDirectory(folder);

    public void Dispose() => Directory.Delete(folder, recursive: true);

    /// <summary>The demo's valley-floor logger for its newest <paramref name="days"/> days as a time,value file.</summary>
    private string HourlyCsv(int days, string name = "logger.csv", params string[] extraLines)
    {
        var readings = DemoSeriesGenerator.Generate(Now).Single(s => s.Site.Id == "ambrel-low").Readings.TakeLast(days * 24);
        var text = new StringBuilder("time,value\n");
        foreach (var r in readings)
        {
            text.Append(r.Time.ToString("yyyy-MM-dd'T'HH:mm:sszzz", CultureInfo.InvariantCulture)).Append(',')
                .Append(r.ValueC.ToString(CultureInfo.InvariantCulture)).Append('\n');
        }
        foreach (var line in extraLines)
        {
            text.Append(line).Append('\n');
        }
        var path = Path.Combine(folder, name);
        File.WriteAllText(path, text.ToString());
        return path;
    }

    private static async Task<(int Code, string Output, string Errors)> Run(params string[] args)
    {
        using var output = new StringWriter(CultureInfo.InvariantCulture);
        using var errors = new StringWriter(CultureInfo.InvariantCulture);
        var code = await OfflineVerbs.RunAsync(args, output, errors, new FakeTimeProvider(Now));
        return (code, output.ToString(), errors.ToString());
    }

    [Fact]
    public async Task FitExplainsTheOrderChoiceAndWritesTheSameFieldsAsTheModelEndpoint()
    {
        var csv = HourlyCsv(days: 120);

        var (code, text, errors) = await Run("fit", csv);

        Assert.True(code == 0, errors);
        Assert.Contains("PACF proposes P =", text, StringComparison.Ordinal);
        Assert.Contains("<- chosen", text, StringComparison.Ordinal);
        Assert.Contains("Ljung-Box Q =", text, StringComparison.Ordinal);
        Assert.Contains("against persistence", text, StringComparison.Ordinal);
        using var json = JsonDocument.Parse(await File.ReadAllTextAsync(Path.Combine(folder, "logger.fit.json")));
        var model = json.RootElement.GetProperty("model");
        var selection = model.GetProperty("orderSelection");
        var chosen = selection.GetProperty("chosenOrder").GetInt32();
        Assert.InRange(chosen, 1, selection.GetProperty("pacfCutoff").GetInt32());
        Assert.Equal(chosen, model.GetProperty("ar").GetProperty("coefficients").GetArrayLength());
        Assert.Equal(selection.GetProperty("maxOrder").GetInt32() + 1, selection.GetProperty("criteria").GetArrayLength());
        Assert.Equal("hourly", json.RootElement.GetProperty("input").GetProperty("cadence").GetString());
        Assert.Contains("median spacing", json.RootElement.GetProperty("input").GetProperty("cadenceChosenBy").GetString(), StringComparison.Ordinal);
    }

    [Fact]
    public async Task FitScoresTheModelAgainstPersistenceAndClimatologyWithCoverage()
    {
        var csv = HourlyCsv(days: 120);

        var (code, _, errors) = await Run("fit", csv, "--out", Path.Combine(folder, "report.json"));

        Assert.True(code == 0, errors);
        using var json = JsonDocument.Parse(await File.ReadAllTextAsync(Path.Combine(folder, "report.json")));
        var pooled = json.RootElement.GetProperty("backtest").GetProperty("pooled");
        // The demo weather anomaly is persistent AR(2): a fitted AR beats "same hour yesterday" and the cycle alone.
        Assert.True(pooled.GetProperty("skillVsPersistence").GetDouble() > 0.2);
        Assert.True(pooled.GetProperty("skillVsClimatology").GetDouble() > 0.2);
        var coverage95 = pooled.GetProperty("intervals").EnumerateArray().Single(i => i.GetProperty("level").GetDouble() == 95).GetProperty("coverage").GetDouble();
        Assert.InRange(coverage95, 0.8, 1.0);
    }

    [Fact]
    public async Task BacktestReportsEveryHorizonOfTheNextDay()
    {
        var csv = HourlyCsv(days: 100);

        var (code, text, errors) = await Run("backtest", csv, "--test-days", "14");

        Assert.True(code == 0, errors);
        using var json = JsonDocument.Parse(await File.ReadAllTextAsync(Path.Combine(folder, "logger.backtest.json")));
        var backtest = json.RootElement.GetProperty("backtest");
        Assert.Equal(24, backtest.GetProperty("horizons").GetArrayLength());
        Assert.InRange(backtest.GetProperty("origins").GetInt32(), 13, 14);
        Assert.Contains("skill p", text, StringComparison.Ordinal);
    }

    [Fact]
    public async Task BacktestWithThresholdsReportsBrierSkillAndReliabilityPerThreshold()
    {
        var csv = HourlyCsv(days: 100);

        var (code, text, errors) = await Run("backtest", csv, "--test-days", "20", "--below", "2,4", "--above", "20");

        Assert.True(code == 0, errors);
        using var json = JsonDocument.Parse(await File.ReadAllTextAsync(Path.Combine(folder, "logger.backtest.json")));
        var thresholds = json.RootElement.GetProperty("backtest").GetProperty("thresholds").EnumerateArray().ToArray();
        Assert.Equal(3, thresholds.Length);
        Assert.Equal(["below", "below", "above"], thresholds.Select(t => t.GetProperty("direction").GetString()));
        foreach (var t in thresholds)
        {
            var count = t.GetProperty("count").GetInt32();
            Assert.InRange(count, 15, 20);
            var bins = t.GetProperty("reliability").EnumerateArray().ToArray();
            Assert.Equal(10, bins.Length);
            Assert.Equal(count, bins.Sum(b => b.GetProperty("count").GetInt32()));
            Assert.InRange(t.GetProperty("brier").GetDouble(), 0, 1);
        }

        Assert.Contains("Brier", text, StringComparison.Ordinal);
        Assert.Contains("same-month base rate", text, StringComparison.Ordinal);
    }

    [Fact]
    public async Task BadThresholdOptionIsRefusedWithItsName()
    {
        var csv = HourlyCsv(days: 30);

        var (code, _, errors) = await Run("backtest", csv, "--below", "frost");

        Assert.Equal(2, code);
        Assert.Contains("--below", errors, StringComparison.Ordinal);
    }

    [Fact]
    public async Task BadRowsAreListedWithTheirLineAndTheRestIsFitted()
    {
        var csv = HourlyCsv(days: 60, "bad.csv", "2025-02-30T10:00:00+00:00,3.2", "2025-03-01T10:00:00,3.2");

        var (code, text, errors) = await Run("fit", csv, "--test-days", "3");

        Assert.True(code == 0, errors);
        Assert.Contains("2 rejected", text, StringComparison.Ordinal);
        Assert.Contains($"line {60 * 24 + 2}:", text, StringComparison.Ordinal);
        Assert.Contains($"line {60 * 24 + 3}:", text, StringComparison.Ordinal);
    }

    [Fact]
    public async Task DailyFileIsRecognisedByItsSpacing()
    {
        var text = new StringBuilder("time,value\n");
        var random = new Random(3);
        for (var d = 0; d < 400; d++)
        {
            var day = new DateTimeOffset(2024, 1, 1, 0, 0, 0, TimeSpan.Zero).AddDays(d);
            var value = 10 - 8 * Math.Cos(2 * Math.PI * (d - 15) / 365.25) + random.NextDouble() * 4;
            text.Append(day.ToString("yyyy-MM-dd'T'HH:mm:sszzz", CultureInfo.InvariantCulture)).Append(',')
                .Append(value.ToString("0.00", CultureInfo.InvariantCulture)).Append('\n');
        }
        var csv = Path.Combine(folder, "daily.csv");
        await File.WriteAllTextAsync(csv, text.ToString());

        var (code, output, errors) = await Run("fit", csv, "--time-zone", "Europe/London");

        Assert.True(code == 0, errors);
        Assert.Contains("Cadence     daily (median spacing of the readings 24 h)", output, StringComparison.Ordinal);
        Assert.Contains("Time zone   Europe/London (--time-zone)", output, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("--method", "magic", "option '--method' must be one of")]
    [InlineData("--max-order", "0", "option '--max-order' must be a whole number")]
    [InlineData("--colour", "blue", "unknown option '--colour'")]
    [InlineData("--time-zone", "Mars/Olympus", "time zone 'Mars/Olympus' is not a known IANA zone")]
    public async Task BadOptionIsRefusedByName(string option, string value, string message)
    {
        var csv = HourlyCsv(days: 20);

        var (code, _, errors) = await Run("fit", csv, option, value);

        Assert.Equal(2, code);
        Assert.Contains(message, errors, StringComparison.Ordinal);
    }

    [Fact]
    public async Task MissingFileIsRefusedWithoutATrace()
    {
        var (code, output, errors) = await Run("fit", Path.Combine(folder, "absent.csv"));

        Assert.Equal(2, code);
        Assert.Contains("does not exist", errors, StringComparison.Ordinal);
        Assert.DoesNotContain("   at ", errors, StringComparison.Ordinal);
        Assert.Equal("", output);
    }

    [Fact]
    public async Task TooShortFileSaysWhyNoModelCanBeFitted()
    {
        var csv = HourlyCsv(days: 0, "short.csv", "2025-03-01T10:00:00+00:00,3.2", "2025-03-01T11:00:00+00:00,3.4");

        var (code, _, errors) = await Run("fit", csv);

        Assert.Equal(2, code);
        Assert.Contains("the service fits a site from 168 on", errors, StringComparison.Ordinal);
    }

    [Fact]
    public async Task HelpDescribesTheFileFormat()
    {
        var (code, output, _) = await Run("fit", "--help");

        Assert.Equal(0, code);
        Assert.Contains("--time-column", output, StringComparison.Ordinal);
        Assert.Contains("--local-times", output, StringComparison.Ordinal);
    }
}
