using ForecastHub.Core.Grid;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Models;

public static class GridStepCounts
{
    private const long HourMs = 3_600_000;
    private const long DayMs = 24 * HourMs;

    /// <summary>
    /// The site's grid steps since <paramref name="from"/> that hold an unflagged reading, and the newest
    /// such reading, counted in the index without reading the history: hourly steps are UTC hours (as in
    /// the grid); daily steps are local standard-time days (the grid's local days, up to the DST hour).
    /// </summary>
    public static Task<StepsWithData> StepsWithDataAsync(this IReadingSummaryStore summaries, SiteRecord site, DateTimeOffset from,
        CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(summaries);
        ArgumentNullException.ThrowIfNull(site);
        return site.IsDaily
            ? summaries.CountStepsWithDataAsync(site.Id, from, DayMs, (long)GridBuilder.FindZone(site.TimeZone).BaseUtcOffset.TotalMilliseconds, cancellationToken)
            : summaries.CountStepsWithDataAsync(site.Id, from, HourMs, 0, cancellationToken);
    }
}
