using System.Globalization;

namespace ForecastHub.Api.Observations;

/// <summary>
/// Times written without an offset, read as wall-clock times of the site's zone (<c>localTimes=true</c>).
/// A time with an offset keeps it. A local time that does not exist (skipped when the clocks go
/// forward) is refused. A local time that occurs twice (when the clocks go back) is read in the order
/// of the body: when exactly two rows carry it, the first is the earlier instant (the summer offset)
/// and the second the later one, as a logger writing through the change produces them; when only one
/// row, or more than two, carry it, the instant is unknown and those rows are refused.
/// </summary>
internal sealed class LocalTimes
{
    private readonly TimeZoneInfo zone;
    private readonly Dictionary<DateTime, int> repeatedCount = [];
    private readonly Dictionary<DateTime, int> repeatedSeen = [];

    /// <summary>Counts the body's repeated local times first, so each row knows whether it is the first or second of a pair.</summary>
    public LocalTimes(TimeZoneInfo zone, IEnumerable<string?> times)
    {
        ArgumentNullException.ThrowIfNull(times);
        this.zone = zone;
        foreach (var text in times)
        {
            if (text is not null && IsoTime.TryParse(text, offsetRequired: false, out var local, out var offset, out _)
                && offset is null && zone.IsAmbiguousTime(local))
            {
                repeatedCount[local] = repeatedCount.GetValueOrDefault(local) + 1;
            }
        }
    }

    /// <summary>Call once per row, in the order of the body.</summary>
    public bool TryRead(string? text, out DateTimeOffset time, out string error)
    {
        time = default;
        if (!IsoTime.TryParse(text, offsetRequired: false, out var local, out var offset, out error))
        {
            return false;
        }
        if (offset is { } given)
        {
            time = new DateTimeOffset(local, given);
            return true;
        }
        var written = local.ToString("yyyy-MM-dd'T'HH:mm:ss", CultureInfo.InvariantCulture);
        if (local.Year < 2 || local.Year > 9998)
        {
            error = "time is outside the representable range.";
            return false;
        }
        if (zone.IsInvalidTime(local))
        {
            error = $"local time {written} does not exist in {zone.Id}: the clocks go forward over it. Check the logger's clock, or send the time with its offset.";
            return false;
        }
        if (!zone.IsAmbiguousTime(local))
        {
            time = new DateTimeOffset(local, zone.GetUtcOffset(local));
            return true;
        }
        var count = repeatedCount.GetValueOrDefault(local);
        var seen = repeatedSeen.GetValueOrDefault(local);
        repeatedSeen[local] = seen + 1;
        if (count != 2)
        {
            error = $"local time {written} occurs twice in {zone.Id} (the clocks go back over it) and this body has {count} row{(count == 1 ? "" : "s")} for it, not a pair read in order; send it with its offset.";
            return false;
        }
        // The first of the pair is the earlier instant: the larger offset (summer time).
        var offsets = zone.GetAmbiguousTimeOffsets(local).Order().ToArray();
        time = new DateTimeOffset(local, seen == 0 ? offsets[^1] : offsets[0]);
        return true;
    }
}
