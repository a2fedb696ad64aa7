using ForecastHub.Api.Cluster;
using ForecastHub.Storage.Sites;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Alerts;

/// <summary>
/// Runs alert evaluations: for each site queued by new data or a refit (a site already waiting is
/// not queued twice), and for every site on a sweep every <see cref="AlertOptions.SweepMinutes"/>
/// (and once at start), so an alert leaves even when nothing else happens. With several nodes each
/// node's sweep claims a site for half a sweep period before evaluating it, so a site is swept by
/// one node per period; a node's own claim never stops it, so a lone node sweeps every site each time.
/// </summary>
public sealed partial class AlertWorker(
    AlertEvaluator evaluator,
    AlertQueue queue,
    ISiteStore sites,
    WorkLeaseRunner leases,
    IOptions<AlertOptions> options,
    TimeProvider clock,
    ILogger<AlertWorker> logger) : BackgroundService
{
    private const int PageSize = 500;

    private TaskCompletionSource sweepDone = new(TaskCreationOptions.RunContinuationsAsynchronously);

    /// <summary>Completes when the sweep that is running or next to run has gone through every site.</summary>
    public Task WhenSweepDoneAsync() => Volatile.Read(ref sweepDone).Task;

    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        await Task.Yield();
        try
        {
            await Task.WhenAll(SweepLoopAsync(stoppingToken), WorkAsync(stoppingToken));
        }
        catch (OperationCanceledException) when (stoppingToken.IsCancellationRequested)
        {
            // Shutting down.
        }
    }

    private async Task WorkAsync(CancellationToken stoppingToken)
    {
        await foreach (var siteId in queue.ReadAllAsync(stoppingToken))
        {
            try
            {
                var site = await sites.GetAsync(siteId, stoppingToken);
                if (site is not null)
                {
                    await EvaluateAsync(site, stoppingToken);
                }
            }
            finally
            {
                queue.Finished();
            }
        }
    }

    private async Task SweepLoopAsync(CancellationToken stoppingToken)
    {
        await SweepAsync(stoppingToken);
        using var timer = new PeriodicTimer(TimeSpan.FromMinutes(options.Value.SweepMinutes), clock);
        while (await timer.WaitForNextTickAsync(stoppingToken))
        {
            await SweepAsync(stoppingToken);
        }
    }

    /// <summary>Evaluates every site, a page at a time; answers the number of events queued.</summary>
    public async Task<int> SweepAsync(CancellationToken cancellationToken)
    {
        var queued = 0;
        try
        {
            string? after = null;
            while (!cancellationToken.IsCancellationRequested)
            {
                var page = await sites.ListAsync(after, PageSize, cancellationToken);
                foreach (var site in page)
                {
                    if (await ClaimSweepAsync(site.Id, cancellationToken))
                    {
                        queued += await EvaluateAsync(site, cancellationToken);
                    }
                }

                if (page.Count < PageSize)
                {
                    break;
                }

                after = page[^1].Id;
            }
        }
        finally
        {
            Interlocked.Exchange(ref sweepDone, new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously)).TrySetResult();
        }

        return queued;
    }

    private async Task<int> EvaluateAsync(SiteRecord site, CancellationToken cancellationToken)
    {
        try
        {
            return await evaluator.EvaluateAsync(site, cancellationToken);
        }
        catch (OperationCanceledException) when (cancellationToken.IsCancellationRequested)
        {
            throw;
        }
#pragma warning disable CA1031 // One site's trouble must not stop alerting for the others.
        catch (Exception error)
#pragma warning restore CA1031
        {
            LogSiteFailed(logger, error, site.Id);
            return 0;
        }
    }

    // Half a period: the next sweep of whichever node gets there first finds the claim run out.
    private async Task<bool> ClaimSweepAsync(string siteId, CancellationToken cancellationToken)
    {
        try
        {
            return await leases.ClaimAsync("alert-sweep", siteId, TimeSpan.FromMinutes(options.Value.SweepMinutes) / 2, cancellationToken);
        }
        catch (OperationCanceledException) when (cancellationToken.IsCancellationRequested)
        {
            throw;
        }
#pragma warning disable CA1031 // Storage trouble with one site's claim must not stop the sweep; the site is evaluated anyway.
        catch (Exception error)
#pragma warning restore CA1031
        {
            LogSiteFailed(logger, error, siteId);
            return true;
        }
    }

    [LoggerMessage(Level = LogLevel.Error, Message = "Alert evaluation of site {SiteId} failed")]
    private static partial void LogSiteFailed(ILogger logger, Exception error, string siteId);
}
