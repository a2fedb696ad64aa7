using ForecastHub.Api.Observations;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Quality;

namespace ForecastHub.Api.CommandLine;

/// <summary>What was read from the file and how cadence and time zone were chosen.</summary>
public sealed record OfflineInputSummary(
    string File,
    int Rows,
    int Accepted,
    int Duplicates,
    int Conflicts,
    int Flagged,
    IReadOnlyList<RejectedReading> Rejected,
    string Cadence,
    string CadenceChosenBy,
    string TimeZone,
    string TimeZoneChosenBy);

/// <summary>
/// A time,value CSV file read with the service's own rules: the strict CSV parser, the per-row
/// checks of the observations endpoint, the QC flags with default limits; the first value for a
/// time wins, later equal values are duplicates and different ones conflicts (both left out).
/// </summary>
internal static class OfflineInput
{
    // Far more than any logger file needs (228 years hourly), and still a bound on memory.
    private const int MaxRows = 2_000_000;

    public static (List<GridReading>? Readings, OfflineInputSummary? Summary, string? Error) Read(OfflineOptions options, DateTimeOffset now)
    {
        ArgumentNullException.ThrowIfNull(options);
        if (!File.Exists(options.InputPath))
        {
            return (null, null, $"file '{options.InputPath}' does not exist.");
        }
        var (rows, error, _) = CsvReadings.Parse(File.ReadAllBytes(options.InputPath), MaxRows, options.Layout);
        if (rows is null)
        {
            return (null, null, $"'{options.InputPath}': {error}");
        }
        var (zone, zoneWhy) = options.TimeZone is { } z
            ? (z, "--time-zone")
            : ("UTC", "default; give --time-zone with the site's IANA zone for local days and hours");
        if (!IsKnownZone(zone))
        {
            return (null, null, $"time zone '{zone}' is not a known IANA zone (for example Europe/London).");
        }
        var (valid, rejected, impossible) = ReadingValidation.Validate(rows, options.Unit ?? TemperatureUnits.Celsius, now,
            options.LocalTimes ? GridBuilder.FindZone(zone) : null);
        OfflineInputSummary Unused(string why) => new(options.InputPath, rows.Count, 0, 0, 0, 0, rejected, options.Cadence ?? "", why, zone, zoneWhy);
        if (options.Unit is null)
        {
            var sent = valid.Where(r => r.OriginalUnit == TemperatureUnits.Celsius).Select(r => r.OriginalValue).Concat(impossible).ToArray();
            if (UnitPlausibility.Check(sent, QualityLimits.Default) is { } unitProblem)
            {
                return (null, Unused("no usable reading"), $"'{options.InputPath}': {unitProblem.Replace("unit=", "--unit ", StringComparison.Ordinal)}");
            }
        }
        var byTime = new SortedDictionary<long, double>();
        int duplicates = 0, conflicts = 0;
        var conflicted = new HashSet<long>();
        foreach (var reading in valid)
        {
            if (!byTime.TryGetValue(reading.TimeMs, out var first))
            {
                byTime[reading.TimeMs] = reading.ValueC;
            }
            else if (first == reading.ValueC)
            {
                duplicates++;
            }
            else
            {
                conflicts++;
                conflicted.Add(reading.TimeMs);
            }
        }
        foreach (var time in conflicted)
        {
            byTime.Remove(time);
        }
        if (byTime.Count == 0)
        {
            return (null, Unused("no usable reading"), $"'{options.InputPath}' has no usable reading ({rejected.Count} rows rejected, {conflicts} conflicting).");
        }

        var points = byTime.Select(p => new QualityPoint(DateTimeOffset.FromUnixTimeMilliseconds(p.Key), p.Value)).ToArray();
        var flags = QualityChecks.Evaluate(points, QualityLimits.Default);
        var readings = points.Select((p, i) => new GridReading(p.Time, p.ValueC, flags[i] != QualityFlags.None)).ToList();
        var (cadence, cadenceWhy) = ChooseCadence(options.Cadence, points);
        var summary = new OfflineInputSummary(options.InputPath, rows.Count, byTime.Count, duplicates, conflicts,
            flags.Count(f => f != QualityFlags.None), rejected, cadence, cadenceWhy, zone, zoneWhy);
        return (readings, summary, null);
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

    /// <summary>Hourly when the median spacing of consecutive readings is under 12 hours, daily otherwise.</summary>
    private static (string Cadence, string Why) ChooseCadence(string? requested, IReadOnlyList<QualityPoint> points)
    {
        if (requested is not null)
        {
            return (requested, "--cadence");
        }
        if (points.Count < 2)
        {
            return ("hourly", "default (a single reading has no spacing)");
        }
        var spacings = points.Zip(points.Skip(1), (a, b) => (b.Time - a.Time).TotalHours).Order().ToArray();
        var median = spacings[spacings.Length / 2];
        var cadence = median < 12 ? "hourly" : "daily";
        return (cadence, $"median spacing of the readings {median:0.##} h");
    }

    public static GridOptions GridOptions(OfflineInputSummary summary, string dailyStatistic) => new(
        summary.Cadence == "daily" ? GridCadence.Daily : GridCadence.Hourly,
        summary.TimeZone,
        dailyStatistic switch
        {
            "min" => DailyStatistic.Min,
            "max" => DailyStatistic.Max,
            _ => DailyStatistic.Mean,
        });
}
