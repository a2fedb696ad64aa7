using System.Collections.Concurrent;
using System.Threading.Channels;

namespace ForecastHub.Api.Models;

/// <summary>A request to look at a site and refit it if a trigger applies (or always, when forced).</summary>
public readonly record struct RefitRequest(string SiteId, bool Force);

/// <summary>
/// The queue that feeds the refit service. Enqueueing never waits (ingestion must not block on
/// fitting), and a site already waiting is not queued twice, so the queue stays as long as the
/// number of sites at most.
/// </summary>
public sealed class RefitQueue
{
    private readonly Channel<RefitRequest> channel = Channel.CreateUnbounded<RefitRequest>(new UnboundedChannelOptions { SingleReader = false });
    private readonly ConcurrentDictionary<string, bool> waiting = new(StringComparer.Ordinal);

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

        channel.Writer.TryWrite(new RefitRequest(siteId, force));
    }

    /// <summary>Called by a worker when it takes a request, so new data after this point queues the site again.</summary>
    public RefitRequest Take(RefitRequest request) =>
        waiting.TryRemove(request.SiteId, out var force) ? request with { Force = force || request.Force } : request;
}
