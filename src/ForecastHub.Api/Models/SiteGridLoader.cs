using ForecastHub.Core.Grid;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Models;

/// <summary>Reads a site's stored readings and turns them into its regular grid.</summary>
public sealed class SiteGridLoader(IReadingStore readings, IReadingSummaryStore summaries, WindowRowCache? fitWindows = null)
{
    /// <summary>
    /// The grid over [<paramref name="from"/>, <paramref name="to"/>): steps after the newest reading
    /// up to <paramref name="to"/> are present and missing, so a caller sees a missing tail.
    /// Null when the site does not exist.
    /// </summary>
    public Task<TimeGrid?> LoadAsync(SiteRecord site, DateTimeOffset from, DateTimeOffset to, CancellationToken cancellationToken) =>
        BuildAsync(site, from, to, ReadAsync(site, from, to, cancellationToken));

    /// <summary>As <see cref="LoadAsync"/>, for a refit's fit window: the rows come through the <see cref="WindowRowCache"/>, so a
    /// refit after new readings reads only the rows newer than the ones it holds.</summary>
    public Task<TimeGrid?> LoadFitWindowAsync(SiteRecord site, DateTimeOffset from, DateTimeOffset to, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(site);
        var rows = fitWindows is null
            ? ReadAsync(site, from, to, cancellationToken)
            : fitWindows.ReadAsync(site, from.ToUnixTimeMilliseconds(), to.ToUnixTimeMilliseconds(),
                (fromMs, toMs, ct) => readings.ReadGridAsync(site.Id, fromMs, toMs, ct), cancellationToken);
        return BuildAsync(site, from, to, rows);
    }

    private static async Task<TimeGrid?> BuildAsync(SiteRecord site, DateTimeOffset from, DateTimeOffset to, Task<IReadOnlyList<GridReading>?> rows)
    {
        var all = await rows;
        try
        {
            return all is null ? null : Build(site, all, from, to);
        }
        finally
        {
            Release(all);
        }
    }

    /// <summary>Gives back the memory of rows read by <see cref="ReadAsync"/> once the caller is done with them (a store may
    /// hand out rows in pooled memory, <see cref="IReadingStore.ReadGridAsync"/>); rows never released are left to the collector.</summary>
    public static void Release(IReadOnlyList<GridReading>? rows) => (rows as IDisposable)?.Dispose();

    /// <summary>The time of the site's newest stored reading; null when it has none (or does not exist).</summary>
    public async Task<DateTimeOffset?> NewestAsync(SiteRecord site, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(site);
        // From the index's newest entry: the reading span would count every row.
        return (await summaries.GetAsync(site.Id, cancellationToken))?.LastObservationAt;
    }

    /// <summary>Where a window of <paramref name="days"/> counted back from the newest reading (or from now, when
    /// that is earlier, or there is none) starts: an archive that ended long ago is still fitted on its own last days.</summary>
    public async Task<DateTimeOffset> WindowStartAsync(SiteRecord site, int days, DateTimeOffset now, CancellationToken cancellationToken)
    {
        var newest = await NewestAsync(site, cancellationToken);
        var anchor = newest is { } n && n < now ? n : now;
        return anchor.AddDays(-days);
    }

    /// <summary>The grid of already-read readings over [<paramref name="from"/>, <paramref name="to"/>).</summary>
    public static TimeGrid Build(SiteRecord site, IReadOnlyList<GridReading> readings, DateTimeOffset from, DateTimeOffset to)
    {
        ArgumentNullException.ThrowIfNull(site);
        var gridFrom = AlignDown(site, from);
        return GridBuilder.Build(readings, site.GridOptions, gridFrom, to > gridFrom ? to : null);
    }

    /// <summary>The site's readings in [<paramref name="from"/>, <paramref name="to"/>) as the grid reads them; null when the site does not exist.</summary>
    public Task<IReadOnlyList<GridReading>?> ReadAsync(SiteRecord site, DateTimeOffset from, DateTimeOffset to, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(site);
        return readings.ReadGridAsync(site.Id, from.ToUnixTimeMilliseconds(), to.ToUnixTimeMilliseconds(), cancellationToken);
    }

    /// <summary>The start of the grid step holding <paramref name="time"/> (<see cref="GridClock.StepStart"/>).</summary>
    public static DateTimeOffset AlignDown(SiteRecord site, DateTimeOffset time)
    {
        ArgumentNullException.ThrowIfNull(site);
        return GridClock.StepStart(site.Cadence, GridBuilder.FindZone(site.TimeZone), time);
    }

    /// <summary>The start of the step after the one starting at <paramref name="stepStart"/>.</summary>
    public static DateTimeOffset NextStep(SiteRecord site, DateTimeOffset stepStart)
    {
        ArgumentNullException.ThrowIfNull(site);
        return GridClock.StepAfter(site.Cadence, GridBuilder.FindZone(site.TimeZone), stepStart, 1);
    }
}
