using System.Collections.Concurrent;
using System.Threading.Channels;
using ForecastHub.Api.Hosting;

namespace ForecastHub.Api.Models;

/// <summary>A request to look at a site and refit it if a trigger applies (or always, when forced).</summary>
public readonly record struct RefitRequest(string SiteId, bool Force);

/// <summary>
/// The queue that feeds the refit service. Enqueueing never waits (ingestion must not block on
/// fitting), and a site already waiting is not queued twice, so the queue stays as long as the
/// number of sites at most. A request names the site by id only: the worker reads the site as it
/// is when it takes the request, so a request queued before a site was deleted (and re-created)
/// never carries the deleted site's data or settings.
/// </summary>
public sealed class RefitQueue
{
    private readonly Channel<RefitRequest> channel = Channel.CreateUnbounded<RefitRequest>(new UnboundedChannelOptions { SingleReader = false });
    private readonly ConcurrentDictionary<string, bool> waiting = new(StringComparer.Ordinal);
    // Requests written to the channel and not yet finished by a worker.
    private readonly PendingWork pending = new();

    public ChannelReader<RefitRequest> Reader => channel.Reader;

    /// <summary>Sites waiting to be looked at.</summary>
    public int Count => waiting.Count;

    public void Enqueue(string siteId, bool force = false)
    {
        // A forced request for a site already waiting upgrades it instead of queueing twice.
        var added = waiting.TryAdd(siteId, force);
        if (!added)
        {
            if (force)
            {
                waiting[siteId] = true;
            }

            return;
        }

        pending.Added();
        channel.Writer.TryWrite(new RefitRequest(siteId, force));
    }

    /// <summary>Called by a worker when it takes a request, so new data after this point queues the site again.</summary>
    public RefitRequest Take(RefitRequest request) =>
        waiting.TryRemove(request.SiteId, out var force) ? request with { Force = force || request.Force } : request;

    /// <summary>Called by a worker when it is done with a request it read (whatever came of it).</summary>
    public void Finished() => pending.Finished();

    /// <summary>Completes when every request queued so far (and any queued meanwhile) has been worked off.</summary>
    public Task WhenIdleAsync() => pending.WhenIdleAsync();
}
