using ForecastHub.Api.Observations;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Quality;
using ForecastHub.Core.Settings;

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
        var (rows, error, _) = CsvReadings.Parse(File.ReadAllBytes(options.InputPath), MaxRows);
        if (rows is null)
        {
            return (null, null, $"'{options.InputPath}': {error}");
        }
        var (valid, rejected) = ReadingValidation.Validate(rows, "C", now);
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
            return (null, null, $"'{options.InputPath}' has no usable reading ({rejected.Count} rows rejected, {conflicts} conflicting).");
        }

        var points = byTime.Select(p => new QualityPoint(DateTimeOffset.FromUnixTimeMilliseconds(p.Key), p.Value)).ToArray();
        var flags = QualityChecks.Evaluate(points, QualityLimits.Default);
        var readings = points.Select((p, i) => new GridReading(p.Time, p.ValueC, flags[i] != QualityFlags.None)).ToList();
        var (cadence, cadenceWhy) = ChooseCadence(options.Cadence, points);
        var (zone, zoneWhy) = options.TimeZone is { } z
            ? (z, "--time-zone")
            : ("UTC", "default; give --time-zone with the site's IANA zone for local days and hours");
        var summary = new OfflineInputSummary(options.InputPath, rows.Count, byTime.Count, duplicates, conflicts,
            flags.Count(f => f != QualityFlags.None), rejected, WireNames.Cadences.Of(cadence), cadenceWhy, zone, zoneWhy);
        return (readings, summary, null);
    }

    /// <summary>Hourly when the median spacing of consecutive readings is under 12 hours, daily otherwise.</summary>
    private static (GridCadence Cadence, string Why) ChooseCadence(GridCadence? requested, IReadOnlyList<QualityPoint> points)
    {
        if (requested is { } cadenceGiven)
        {
            return (cadenceGiven, "--cadence");
        }
        if (points.Count < 2)
        {
            return (GridCadence.Hourly, "default (a single reading has no spacing)");
        }
        var spacings = points.Zip(points.Skip(1), (a, b) => (b.Time - a.Time).TotalHours).Order().ToArray();
        var median = spacings[spacings.Length / 2];
        var cadence = median < 12 ? GridCadence.Hourly : GridCadence.Daily;
        return (cadence, $"median spacing of the readings {median:0.##} h");
    }
}
