using System.Globalization;
using ForecastHub.Api.Observations;
using ForecastHub.Core.Settings;

namespace ForecastHub.Api.CommandLine;

/// <summary>What <c>fit</c> and <c>backtest</c> were asked to do. Null cadence or zone: chosen from the file.</summary>
public sealed record OfflineOptions(
    string Verb,
    string InputPath,
    string? OutputPath,
    string? Cadence,
    string? TimeZone,
    string DailyStatistic,
    string Seasonality,
    string Method,
    string OrderPolicy,
    int MaxOrder,
    int? FitWindowDays,
    string IntervalMethod,
    int? TestDays,
    int RefitEveryDays)
{
    /// <summary>Thresholds in degrees C whose next-24-hour risk the backtest verifies (--below, --above).</summary>
    public IReadOnlyList<double> Below { get; init; } = [];

    public IReadOnlyList<double> Above { get; init; } = [];

    /// <summary>The file's layout (columns, separator, decimal mark).</summary>
    public CsvLayout Layout { get; init; } = CsvLayout.Default;

    /// <summary>Unit of values without a unit column; null: degrees C, with the unit check of the service.</summary>
    public string? Unit { get; init; }

    /// <summary>Times without an offset are wall-clock times of --time-zone.</summary>
    public bool LocalTimes { get; init; }

    public const string Usage = """
        Usage: ForecastHub.Api fit|backtest FILE.csv [options]

        FILE.csv holds a header line naming its columns, then one reading per line: an ISO 8601 time
        (with an offset, or local with --local-times), and the value in degrees C (or --unit, or the
        row's unit column: C, F, K). Other columns are ignored.

        File layout:
          --time-column NAME|N         the time column, by header name or 1-based position (default: time)
          --value-column NAME|N        the value column (default: value)
          --unit-column NAME|N         the unit column (default: a column named unit, if any)
          --separator ,|;|tab          field separator (default: ,)
          --decimal .|,                decimal mark (default: .)
          --unit C|F|K                 unit of values without a unit column (default: C, refused when the
                                       values look like another unit; --unit C insists)
          --local-times                times without an offset are local times of --time-zone (a time the
                                       clocks skip is rejected; a repeated hour is read as a pair in file order)

        Model options (the defaults are the service's defaults for a new site):
          --cadence hourly|daily       grid step (default: from the median spacing of the times)
          --time-zone ZONE             IANA zone for local days and hours (default: UTC)
          --daily-statistic mean|min|max   statistic of a daily grid (default: mean)
          --seasonality auto|none|annual|annual-diurnal   (default: auto)
          --method burg|yule-walker|least-squares|max-likelihood   (default: burg)
          --order-policy pacf-aic|aic|aicc|bic|pacf       (default: pacf-aic)
          --max-order N                upper limit on the AR order (default: 48)
          --fit-window-days N          days of history fitted (default: 400 hourly, 1461 daily)
          --interval-method calibrated|gaussian          (default: calibrated)
          --test-days N                days at the end scored by the backtest (default: fit 30, backtest 90)
          --refit-every-days N         backtest refit interval (default: 7)
          --below C[,C...]             verify the chance of falling below each threshold in the next 24 hours
                                       (Brier score, skill against the same month's base rate, reliability table)
          --above C[,C...]             the same for rising above each threshold
          --out FILE.json              JSON report (default: beside the input, FILE.fit.json / FILE.backtest.json)

        The text report goes to standard output; exit code 0 on success, 2 on bad input.
        """;

    // The settings' words come from the one table the API and storage use.
    private static readonly Dictionary<string, IReadOnlyList<string>> Choices = new(StringComparer.Ordinal)
    {
        ["--cadence"] = WireNames.Cadences.Words,
        ["--daily-statistic"] = WireNames.DailyStatistics.Words,
        ["--seasonality"] = WireNames.Seasonalities.Words,
        ["--method"] = WireNames.Methods.Words,
        ["--order-policy"] = WireNames.OrderPolicies.Words,
        ["--interval-method"] = WireNames.IntervalMethods.Words,
        ["--unit"] = ["C", "F", "K"],
    };

    private static readonly string[] Numbers = ["--max-order", "--fit-window-days", "--test-days", "--refit-every-days"];

    private static readonly string[] Texts = ["--time-zone", "--out", "--time-column", "--value-column", "--unit-column", "--separator", "--decimal"];

    private static readonly string[] Switches = ["--local-times"];

    private static readonly string[] Thresholds = ["--below", "--above"];

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
            if (Switches.Contains(arg))
            {
                values[arg] = "true";
                continue;
            }
            var (name, value) = arg.Contains('=', StringComparison.Ordinal)
                ? (arg[..arg.IndexOf('=', StringComparison.Ordinal)], arg[(arg.IndexOf('=', StringComparison.Ordinal) + 1)..])
                : (arg, i + 1 < args.Count ? args[++i] : null);
            if (!Choices.ContainsKey(name) && !Numbers.Contains(name) && !Texts.Contains(name) && !Thresholds.Contains(name))
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
            if (Thresholds.Contains(name) && ParseThresholds(value) is null)
            {
                return (null, $"option '{name}' must be up to 8 comma-separated temperatures in degrees C between -95 and 65, not '{value}'.");
            }
            values[name] = value;
        }
        if (input is null)
        {
            return (null, "name the CSV file to read.");
        }
        var (layout, _, layoutError) = CsvLayout.From(values.GetValueOrDefault("--time-column"), values.GetValueOrDefault("--value-column"),
            values.GetValueOrDefault("--unit-column"), values.GetValueOrDefault("--separator"), values.GetValueOrDefault("--decimal"));
        if (layout is null)
        {
            return (null, layoutError);
        }
        if (values.ContainsKey("--local-times") && !values.ContainsKey("--time-zone"))
        {
            return (null, "--local-times reads times in the site's zone: give it with --time-zone ZONE.");
        }
        int? Number(string name) => values.TryGetValue(name, out var v) ? int.Parse(v, CultureInfo.InvariantCulture) : null;
        string Text(string name, string fallback) => values.GetValueOrDefault(name, fallback);
        return (new OfflineOptions(
            verb,
            input,
            values.GetValueOrDefault("--out"),
            values.GetValueOrDefault("--cadence"),
            values.GetValueOrDefault("--time-zone"),
            Text("--daily-statistic", "mean"),
            Text("--seasonality", "auto"),
            Text("--method", "burg"),
            Text("--order-policy", "pacf-aic"),
            Number("--max-order") ?? 48,
            Number("--fit-window-days"),
            Text("--interval-method", "calibrated"),
            Number("--test-days"),
            Number("--refit-every-days") ?? 7)
        {
            Below = values.TryGetValue("--below", out var below) ? ParseThresholds(below)! : [],
            Above = values.TryGetValue("--above", out var above) ? ParseThresholds(above)! : [],
            Layout = layout,
            Unit = values.GetValueOrDefault("--unit"),
            LocalTimes = values.ContainsKey("--local-times"),
        }, null);
    }

    private static double[]? ParseThresholds(string text)
    {
        var parts = text.Split(',', StringSplitOptions.TrimEntries);
        var values = new List<double>();
        foreach (var part in parts)
        {
            if (!double.TryParse(part, NumberStyles.AllowLeadingSign | NumberStyles.AllowDecimalPoint, CultureInfo.InvariantCulture, out var v)
                || v is < -95 or > 65)
            {
                return null;
            }

            values.Add(v);
        }

        return values.Count is > 0 and <= 8 ? [.. values.Distinct()] : null;
    }
}
