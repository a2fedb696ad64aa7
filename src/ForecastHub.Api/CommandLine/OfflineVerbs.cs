using System.Diagnostics;
using System.Text.Json;
using ForecastHub.Api.Models;
using ForecastHub.Api.Verification;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Health;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Quality;
using ForecastHub.Core.Series;
using ForecastHub.Core.Settings;
using ForecastHub.Core.Verification;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Sites;
using ModelResponse = ForecastHub.Api.Models.ModelResponse;

namespace ForecastHub.Api.CommandLine;

/// <summary>The JSON report: the input, the model as <c>GET .../model</c> shows it, and the backtest as
/// <c>GET .../verification</c> shows it (null when the history is too short for one origin). When no
/// model could be fitted, <c>error</c> says why (and <c>health</c> is <c>warming-up</c> when the data are too few).</summary>
public sealed record OfflineReport(string Verb, DateTimeOffset RunAt, OfflineInputSummary? Input, ModelResponse? Model, BacktestResponse? Backtest)
{
    public string? Error { get; init; }

    public string? Health { get; init; }
}

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
        var jsonPath = options.OutputPath ?? Path.ChangeExtension(options.InputPath, $".{options.Verb}.json");
        var (readings, input, inputError) = OfflineInput.Read(options, now);
        if (readings is null || input is null)
        {
            return await Refuse(options, jsonPath, now, input, null, inputError!, errors).ConfigureAwait(false);
        }

        var site = Site(options, input, now);
        var valid = readings.Where(r => !r.Flagged).ToList();
        var dataEnd = valid.Count > 0 ? valid[^1].Time : readings[^1].Time;
        var grid = SiteGridLoader.Build(site, readings, readings[0].Time, SiteGridLoader.NextStep(site, SiteGridLoader.AlignDown(site, dataEnd)));
        // The service's own rule: no fit below the minimum of grid points (health warming-up).
        var health = new HealthOptions();
        var minPoints = input.Cadence == "daily" ? health.MinDailyPoints : health.MinHourlyPoints;
        if (grid.ObservedCount < minPoints)
        {
            return await Refuse(options, jsonPath, now, input, "warming-up",
                $"'{options.InputPath}' has {grid.ObservedCount} {input.Cadence} grid points; the service fits a site from {minPoints} on ({(input.Cadence == "daily" ? "60 days" : "7 days")}) and answers warming-up until then.",
                errors).ConfigureAwait(false);
        }
        ModelResponse model;
        var stopwatch = Stopwatch.StartNew();
        try
        {
            var fitted = FittedSiteModel.Fit(grid, site.Model);
            var stored = new StoredModel(SiteId, site.Key, now, stopwatch.Elapsed.TotalMilliseconds, site.SettingsVersion, fitted.DataEnd,
                fitted.Model.Window.Points, fitted.ResidualPValue, fitted.Json);
            model = ModelMapping.Describe(site, new ServingModel(stored, fitted.Model), null);
        }
        catch (SeriesException e)
        {
            return await Refuse(options, jsonPath, now, input, null, $"no model can be fitted to '{options.InputPath}': {e.Message}", errors).ConfigureAwait(false);
        }

        var testDays = options.TestDays ?? (options.Verb == "fit" ? FitTestDays : BacktestTestDays);
        using var progress = CommandLineProgress.Start(errors, "backtest");
        var thresholds = site.Risk.WithQueryThresholds(options.Below, options.Above);
        var backtest = BacktestResponse.Of(Backtest.Run(readings, site.GridOptions, site.Model, new BacktestOptions
        {
            DataEnd = dataEnd,
            Days = testDays,
            RefitEveryDays = options.RefitEveryDays,
            Thresholds = thresholds,
            Night = site.Risk.Night,
            Progress = progress.Report,
        }), thresholds);
        progress.Done();
        var report = new OfflineReport(options.Verb, now, input, model, backtest);
        await File.WriteAllTextAsync(jsonPath, JsonSerializer.Serialize(report, Json)).ConfigureAwait(false);
        await output.WriteAsync(OfflineReportText.Format(report, jsonPath)).ConfigureAwait(false);
        return 0;
    }

    // No model: the reason and every rejected line on standard error, and the JSON report with the reason.
    private static async Task<int> Refuse(OfflineOptions options, string jsonPath, DateTimeOffset now, OfflineInputSummary? input,
        string? health, string message, TextWriter errors)
    {
        var report = new OfflineReport(options.Verb, now, input, null, null) { Error = message, Health = health };
        await errors.WriteLineAsync($"error: {message}").ConfigureAwait(false);
        if (input is not null)
        {
            foreach (var line in OfflineReportText.RejectedLines(input.Rejected))
            {
                await errors.WriteLineAsync(line).ConfigureAwait(false);
            }
        }
        await File.WriteAllTextAsync(jsonPath, JsonSerializer.Serialize(report, Json)).ConfigureAwait(false);
        await errors.WriteLineAsync($"JSON report {jsonPath}").ConfigureAwait(false);
        return 2;
    }

    private static SiteRecord Site(OfflineOptions options, OfflineInputSummary input, DateTimeOffset now)
    {
        // The option words were checked against the same table; here they become the typed settings, once.
        var cadence = WireNames.Cadences.Parse(input.Cadence);
        var defaults = ModelSettings.DefaultFor(cadence);
        var model = new ModelSettings
        {
            Seasonality = WireNames.Seasonalities.Parse(options.Seasonality),
            Method = WireNames.Methods.Parse(options.Method),
            OrderPolicy = WireNames.OrderPolicies.Parse(options.OrderPolicy),
            MaxOrder = options.MaxOrder,
            FitWindowDays = options.FitWindowDays ?? defaults.FitWindowDays,
            IntervalMethod = WireNames.IntervalMethods.Parse(options.IntervalMethod),
        };
        return new SiteRecord(SiteId, Path.GetFileName(options.InputPath), input.TimeZone, cadence,
            cadence == GridCadence.Daily ? WireNames.DailyStatistics.Parse(options.DailyStatistic) : null, null, null, null, QualityLimits.Default, model, now, now);
    }

    private static async Task<int> Fail(TextWriter errors, string message)
    {
        await errors.WriteLineAsync($"error: {message}").ConfigureAwait(false);
        await errors.WriteLineAsync("Run with --help for the file format and options.").ConfigureAwait(false);
        return 2;
    }
}
