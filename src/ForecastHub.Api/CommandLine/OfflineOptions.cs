using System.Globalization;
using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Climatology;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Selection;
using ForecastHub.Core.Settings;

namespace ForecastHub.Api.CommandLine;

/// <summary>What <c>fit</c> and <c>backtest</c> were asked to do, parsed once into typed settings.
/// Null cadence or zone: chosen from the file. Null fit window: the default of the cadence.</summary>
public sealed record OfflineOptions(
    string Verb,
    string InputPath,
    string? OutputPath,
    GridCadence? Cadence,
    string? TimeZone,
    DailyStatistic DailyStatistic,
    Seasonality Seasonality,
    ArMethod Method,
    OrderPolicy OrderPolicy,
    int MaxOrder,
    int? FitWindowDays,
    IntervalMethod IntervalMethod,
    int? TestDays,
    int RefitEveryDays)
{
    /// <summary>The model settings of a site of <paramref name="cadence"/>: the service's defaults changed by the options given.</summary>
    public ModelSettings Model(GridCadence cadence)
    {
        var defaults = ModelSettings.DefaultFor(cadence);
        return defaults with
        {
            Seasonality = Seasonality,
            Method = Method,
            OrderPolicy = OrderPolicy,
            MaxOrder = MaxOrder,
            FitWindowDays = FitWindowDays ?? defaults.FitWindowDays,
            IntervalMethod = IntervalMethod,
        };
    }

    public static readonly string Usage = $"""
        Usage: ForecastHub.Api fit|backtest FILE.csv [options]

        FILE.csv holds a header line 'time,value' (or 'time,value,unit'), then one reading per line:
        an ISO 8601 time with an offset, and the value in degrees C (or the row's unit: C, F, K).

        Options (the defaults are the service's defaults for a new site):
          --cadence {Words(WireNames.Cadences)}       grid step (default: from the median spacing of the times)
          --time-zone ZONE             IANA zone for local days and hours (default: UTC)
          --daily-statistic {Words(WireNames.DailyStatistics)}   statistic of a daily grid (default: {WireNames.DailyStatistics.Of(default)})
          --seasonality {Words(WireNames.Seasonalities)}   (default: {WireNames.Seasonalities.Of(new ModelSettings().Seasonality)})
          --method {Words(WireNames.Methods)}   (default: {WireNames.Methods.Of(new ModelSettings().Method)})
          --order-policy {Words(WireNames.OrderPolicies)}       (default: {WireNames.OrderPolicies.Of(new ModelSettings().OrderPolicy)})
          --max-order N                upper limit on the AR order (default: {ModelSettings.DefaultMaxOrder})
          --fit-window-days N          days of history fitted (default: {ModelSettings.DefaultFitWindowDaysHourly} hourly, {ModelSettings.DefaultFitWindowDaysDaily} daily)
          --interval-method {Words(WireNames.IntervalMethods)}          (default: {WireNames.IntervalMethods.Of(new ModelSettings().IntervalMethod)})
          --test-days N                days at the end scored by the backtest (default: fit 30, backtest 90)
          --refit-every-days N         backtest refit interval (default: 7)
          --out FILE.json              JSON report (default: beside the input, FILE.fit.json / FILE.backtest.json)

        The text report goes to standard output; exit code 0 on success, 2 on bad input.
        """;

    private static readonly Dictionary<string, IReadOnlyList<string>> Choices = new(StringComparer.Ordinal)
    {
        ["--cadence"] = WireNames.Cadences.Words,
        ["--daily-statistic"] = WireNames.DailyStatistics.Words,
        ["--seasonality"] = WireNames.Seasonalities.Words,
        ["--method"] = WireNames.Methods.Words,
        ["--order-policy"] = WireNames.OrderPolicies.Words,
        ["--interval-method"] = WireNames.IntervalMethods.Words,
    };

    private static readonly string[] Numbers = ["--max-order", "--fit-window-days", "--test-days", "--refit-every-days"];

    private static readonly string[] Texts = ["--time-zone", "--out"];

    /// <summary>Reads the arguments after the verb; an error names the bad option.</summary>
    public static (OfflineOptions? Options, string? Error) Parse(string verb, IReadOnlyList<string> args)
    {
        ArgumentNullException.ThrowIfNull(args);
        string? input = null;
        var values = new Dictionary<string, string>(StringComparer.Ordinal);
        for (var i = 0; i < args.Count; i++)
        {
            var arg = args[i];
            if (!arg.StartsWith("--", StringComparison.Ordinal))
            {
                if (input is not null)
                {
                    return (null, $"only one input file is read; '{arg}' is a second one.");
                }
                input = arg;
                continue;
            }
            var (name, value) = arg.Contains('=', StringComparison.Ordinal)
                ? (arg[..arg.IndexOf('=', StringComparison.Ordinal)], arg[(arg.IndexOf('=', StringComparison.Ordinal) + 1)..])
                : (arg, i + 1 < args.Count ? args[++i] : null);
            if (!Choices.ContainsKey(name) && !Numbers.Contains(name) && !Texts.Contains(name))
            {
                return (null, $"unknown option '{name}'.");
            }
            if (value is null)
            {
                return (null, $"option '{name}' needs a value.");
            }
            if (Choices.TryGetValue(name, out var allowed) && !allowed.Contains(value))
            {
                return (null, $"option '{name}' must be one of {string.Join(", ", allowed)}, not '{value}'.");
            }
            if (Numbers.Contains(name) && (!int.TryParse(value, NumberStyles.None, CultureInfo.InvariantCulture, out var n) || n < 1))
            {
                return (null, $"option '{name}' must be a whole number of at least 1, not '{value}'.");
            }
            values[name] = value;
        }
        if (input is null)
        {
            return (null, "name the CSV file to read.");
        }
        int? Number(string name) => values.TryGetValue(name, out var v) ? int.Parse(v, CultureInfo.InvariantCulture) : null;
        T Choice<T>(string name, WordTable<T> table, T fallback)
            where T : struct, Enum => values.TryGetValue(name, out var word) ? table.Parse(word) : fallback;
        var defaults = new ModelSettings();
        return (new OfflineOptions(
            verb,
            input,
            values.GetValueOrDefault("--out"),
            values.ContainsKey("--cadence") ? Choice("--cadence", WireNames.Cadences, GridCadence.Hourly) : null,
            values.GetValueOrDefault("--time-zone"),
            Choice("--daily-statistic", WireNames.DailyStatistics, DailyStatistic.Mean),
            Choice("--seasonality", WireNames.Seasonalities, defaults.Seasonality),
            Choice("--method", WireNames.Methods, defaults.Method),
            Choice("--order-policy", WireNames.OrderPolicies, defaults.OrderPolicy),
            Number("--max-order") ?? defaults.MaxOrder,
            Number("--fit-window-days"),
            Choice("--interval-method", WireNames.IntervalMethods, defaults.IntervalMethod),
            Number("--test-days"),
            Number("--refit-every-days") ?? 7), null);
    }

    private static string Words<T>(WordTable<T> table)
        where T : struct, Enum => string.Join('|', table.Words);
}
