using System.Diagnostics;
using System.Text.Json;
using ForecastHub.Api.Models;
using ForecastHub.Api.Sites;
using ForecastHub.Api.Verification;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Quality;
using ForecastHub.Core.Series;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Sites;
using ModelResponse = ForecastHub.Api.Models.ModelResponse;

namespace ForecastHub.Api.CommandLine;

/// <summary>The JSON report: the input, the model as <c>GET .../model</c> shows it, and the backtest as
/// <c>GET .../verification</c> shows it (null when the history is too short for one origin).</summary>
public sealed record OfflineReport(string Verb, DateTimeOffset RunAt, OfflineInputSummary Input, ModelResponse Model, BacktestResponse? Backtest);

/// <summary>
/// <c>fit FILE.csv</c> and <c>backtest FILE.csv</c>: the service's own pipeline (CSV rules, QC,
/// grid, fit, backtest) on a file, without a server or a database. Handled before the web host is
/// built. Exit codes: 0 done, 2 bad arguments or input the model cannot use.
/// </summary>
public static class OfflineVerbs
{
    public const string SiteId = "offline";
    private const int FitTestDays = 30;
    private const int BacktestTestDays = 90;

    private static readonly JsonSerializerOptions Json = new(JsonSerializerDefaults.Web)
    {
        WriteIndented = true,
        NumberHandling = System.Text.Json.Serialization.JsonNumberHandling.AllowNamedFloatingPointLiterals,
    };

    public static bool IsRequested(IReadOnlyList<string> args) =>
        args is { Count: > 0 } && args[0] is "fit" or "backtest";

    public static async Task<int> RunAsync(IReadOnlyList<string> args, TextWriter output, TextWriter errors, TimeProvider time)
    {
        ArgumentNullException.ThrowIfNull(args);
        ArgumentNullException.ThrowIfNull(output);
        ArgumentNullException.ThrowIfNull(errors);
        ArgumentNullException.ThrowIfNull(time);
        if (args.Skip(1).Any(a => a is "--help" or "-h"))
        {
            await output.WriteLineAsync(OfflineOptions.Usage).ConfigureAwait(false);
            return 0;
        }
        var (options, optionError) = OfflineOptions.Parse(args[0], [.. args.Skip(1)]);
        if (options is null)
        {
            return await Fail(errors, optionError!).ConfigureAwait(false);
        }
        var now = time.GetUtcNow();
        var (readings, input, inputError) = OfflineInput.Read(options, now);
        if (readings is null || input is null)
        {
            return await Fail(errors, inputError!).ConfigureAwait(false);
        }
        if (!IsKnownZone(input.TimeZone))
        {
            return await Fail(errors, $"time zone '{input.TimeZone}' is not a known IANA zone (for example Europe/London).").ConfigureAwait(false);
        }

        var site = Site(options, input, now);
        var modeling = new SiteModeling();
        var valid = readings.Where(r => !r.Flagged).ToList();
        var dataEnd = valid.Count > 0 ? valid[^1].Time : readings[^1].Time;
        var grid = SiteGridLoader.Build(site, readings, readings[0].Time, SiteGridLoader.NextStep(site, SiteGridLoader.AlignDown(site, dataEnd)));
        ModelResponse model;
        var stopwatch = Stopwatch.StartNew();
        try
        {
            var fitted = modeling.Fit(grid, site);
            var stored = new StoredModel(SiteId, now, stopwatch.Elapsed.TotalMilliseconds, site.SettingsVersion, fitted.DataEnd,
                fitted.Model.Window.Points, fitted.ResidualPValue, fitted.Json);
            model = modeling.Describe(site, new ServingModel(stored, fitted.Model), null);
        }
        catch (SeriesException e)
        {
            return await Fail(errors, $"no model can be fitted to '{options.InputPath}': {e.Message}").ConfigureAwait(false);
        }

        var testDays = options.TestDays ?? (options.Verb == "fit" ? FitTestDays : BacktestTestDays);
        var backtest = Backtester.Run(site, readings, dataEnd, testDays, options.RefitEveryDays,
            SiteModeling.RiskThresholds(site.Risk, options.Below, options.Above));
        var report = new OfflineReport(options.Verb, now, input, model, backtest);
        var jsonPath = options.OutputPath ?? Path.ChangeExtension(options.InputPath, $".{options.Verb}.json");
        await File.WriteAllTextAsync(jsonPath, JsonSerializer.Serialize(report, Json)).ConfigureAwait(false);
        await output.WriteAsync(OfflineReportText.Format(report, jsonPath)).ConfigureAwait(false);
        return 0;
    }

    private static SiteRecord Site(OfflineOptions options, OfflineInputSummary input, DateTimeOffset now)
    {
        var defaults = SiteRules.DefaultModel(input.Cadence);
        var model = new Storage.Sites.ModelSettings(options.Seasonality, options.Method, options.OrderPolicy, options.MaxOrder,
            options.FitWindowDays ?? defaults.FitWindowDays, options.IntervalMethod);
        return new SiteRecord(SiteId, Path.GetFileName(options.InputPath), input.TimeZone, input.Cadence,
            input.Cadence == "daily" ? options.DailyStatistic : null, null, null, null, QualityLimits.Default, model, now, now);
    }

    private static bool IsKnownZone(string zone)
    {
        try
        {
            GridBuilder.FindZone(zone);
            return true;
        }
        catch (ArgumentException)
        {
            return false;
        }
    }

    private static async Task<int> Fail(TextWriter errors, string message)
    {
        await errors.WriteLineAsync($"error: {message}").ConfigureAwait(false);
        await errors.WriteLineAsync("Run with --help for the file format and options.").ConfigureAwait(false);
        return 2;
    }
}
