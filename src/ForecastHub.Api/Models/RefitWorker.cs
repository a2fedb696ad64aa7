using ForecastHub.Api.Cluster;
using ForecastHub.Storage.Sites;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Models;

/// <summary>
/// The background refit service: <see cref="RefitOptions.MaxConcurrency"/> workers take sites from
/// the <see cref="RefitQueue"/> and refit those a trigger applies to; a sweep every
/// <see cref="RefitOptions.SweepInterval"/> queues every site (model age) and runs the daily
/// archive-and-score step. Nothing here throws out of the loop: a failing site is logged and skipped.
/// Across several nodes each site's work runs on one node at a time: a fit under the site's
/// "refit" lease, and a sweep of the site under its "sweep" lease, kept for half a sweep interval
/// so the other nodes' sweeps of that period pass the site by.
/// </summary>
public sealed partial class RefitWorker(
    RefitQueue queue,
    ISiteStore sites,
    WorkLeaseRunner leases,
    ModelService models,
    IEnumerable<ISweepStep> sweepSteps,
    IOptions<RefitOptions> options,
    TimeProvider clock,
    ILogger<RefitWorker> logger) : BackgroundService
{
    private const int PageSize = 500;

    private TaskCompletionSource sweepDone = new(TaskCreationOptions.RunContinuationsAsynchronously);

    /// <summary>Completes when the sweep that is running or next to run has gone through every site.</summary>
    public Task WhenSweepDoneAsync() => Volatile.Read(ref sweepDone).Task;

    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        // The stores answer synchronously; yielding first keeps host start-up from waiting on the sweep.
        await Task.Yield();
        if (!options.Value.Enabled)
        {
            LogDisabled(logger);
            return;
        }

        // Sites whose data arrived while the service was down are looked at once at start.
        var startSweep = SweepAsync(stoppingToken);
        var workers = Enumerable.Range(0, options.Value.MaxConcurrency).Select(_ => Task.Run(() => WorkAsync(stoppingToken), stoppingToken));
        var sweeper = Task.Run(() => SweepLoopAsync(stoppingToken), stoppingToken);
        try
        {
            await Task.WhenAll([startSweep, sweeper, .. workers]);
        }
        catch (OperationCanceledException) when (stoppingToken.IsCancellationRequested)
        {
            // Shutting down.
        }
    }

    private async Task WorkAsync(CancellationToken stoppingToken)
    {
        await foreach (var request in queue.Reader.ReadAllAsync(stoppingToken))
        {
            var taken = queue.Take(request);
            try
            {
                // Another node holding the lease is fitting the site; if it dies, a later sweep finds the site again.
                await leases.RunAsync("refit", taken.SiteId, async cancellationToken =>
                {
                    var site = await sites.GetAsync(taken.SiteId, cancellationToken);
                    if (site is not null)
                    {
                        await models.RefitIfDueAsync(site, taken.Force, cancellationToken);
                    }
                }, stoppingToken);
            }
            catch (OperationCanceledException) when (stoppingToken.IsCancellationRequested)
            {
                return;
            }
#pragma warning disable CA1031 // One site's trouble (say a storage hiccup) must not stop the workers.
            catch (Exception error)
#pragma warning restore CA1031
            {
                LogSiteFailed(logger, error, taken.SiteId);
            }
            finally
            {
                queue.Finished();
            }
        }
    }

    private async Task SweepLoopAsync(CancellationToken stoppingToken)
    {
        using var timer = new PeriodicTimer(options.Value.SweepInterval, clock);
        while (await timer.WaitForNextTickAsync(stoppingToken))
        {
            await SweepAsync(stoppingToken);
        }
    }

    /// <summary>Queues every site and runs the sweep steps on each; used by the timer and at start.</summary>
    public async Task SweepAsync(CancellationToken cancellationToken)
    {
        try
        {
            await SweepSitesAsync(cancellationToken);
        }
        finally
        {
            Interlocked.Exchange(ref sweepDone, new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously)).TrySetResult();
        }
    }

    private async Task SweepSitesAsync(CancellationToken cancellationToken)
    {
        string? after = null;
        while (!cancellationToken.IsCancellationRequested)
        {
            IReadOnlyList<SiteRecord> page;
            try
            {
                page = await sites.ListAsync(after, PageSize, cancellationToken);
            }
            catch (OperationCanceledException)
            {
                return;
            }

            foreach (var site in page)
            {
                if (!await ClaimSweepAsync(site.Id, cancellationToken))
                {
                    continue;
                }

                queue.Enqueue(site.Id);
                foreach (var step in sweepSteps)
                {
                    try
                    {
                        await step.RunAsync(site, cancellationToken);
                    }
                    catch (OperationCanceledException) when (cancellationToken.IsCancellationRequested)
                    {
                        return;
                    }
#pragma warning disable CA1031 // A sweep step failing for one site must not stop the sweep.
                    catch (Exception error)
#pragma warning restore CA1031
                    {
                        LogSiteFailed(logger, error, site.Id);
                    }
                }
            }

            if (page.Count < PageSize)
            {
                return;
            }

            after = page[^1].Id;
        }
    }

    private async Task<bool> ClaimSweepAsync(string siteId, CancellationToken cancellationToken)
    {
        try
        {
            return await leases.ClaimAsync("sweep", siteId, options.Value.SweepInterval / 2, cancellationToken);
        }
        catch (OperationCanceledException) when (cancellationToken.IsCancellationRequested)
        {
            return false;
        }
#pragma warning disable CA1031 // Storage trouble for one site's lease must not stop the sweep.
        catch (Exception error)
#pragma warning restore CA1031
        {
            LogSiteFailed(logger, error, siteId);
            return false;
        }
    }

    [LoggerMessage(Level = LogLevel.Warning, Message = "Refit:Enabled is false: this node runs no background fits or sweeps")]
    private static partial void LogDisabled(ILogger logger);

    [LoggerMessage(Level = LogLevel.Error, Message = "Background work for site {SiteId} failed")]
    private static partial void LogSiteFailed(ILogger logger, Exception error, string siteId);
}

/// <summary>Work the periodic sweep does for each site besides queueing it (archiving and scoring day-ahead forecasts).</summary>
public interface ISweepStep
{
    Task RunAsync(SiteRecord site, CancellationToken cancellationToken);
}
