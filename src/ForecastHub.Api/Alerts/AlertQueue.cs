using System.Collections.Concurrent;
using System.Threading.Channels;
using ForecastHub.Api.Hosting;

namespace ForecastHub.Api.Alerts;

/// <summary>Sites waiting for an alert evaluation after new data or a refit. Enqueueing never waits,
/// and a site already waiting is not queued twice. It depends on nothing, so the stores can feed it.</summary>
public sealed class AlertQueue
{
    private readonly Channel<string> channel = Channel.CreateUnbounded<string>(new UnboundedChannelOptions { SingleReader = true });
    private readonly ConcurrentDictionary<string, byte> waiting = new(StringComparer.Ordinal);
    // Sites written to the channel and not yet evaluated.
    private readonly PendingWork pending = new();

    public void Enqueue(string siteId)
    {
        if (waiting.TryAdd(siteId, 0))
        {
            pending.Added();
            channel.Writer.TryWrite(siteId);
        }
    }

    /// <summary>Called by the worker when it is done with a site it read (whatever came of it).</summary>
    public void Finished() => pending.Finished();

    /// <summary>Completes when every site queued so far (and any queued meanwhile) has been evaluated.</summary>
    public Task WhenIdleAsync() => pending.WhenIdleAsync();

    /// <summary>The waiting sites, each taken off the waiting set as it is read, so new data after that queues it again.</summary>
    public async IAsyncEnumerable<string> ReadAllAsync([System.Runtime.CompilerServices.EnumeratorCancellation] CancellationToken cancellationToken)
    {
        await foreach (var siteId in channel.Reader.ReadAllAsync(cancellationToken))
        {
            waiting.TryRemove(siteId, out _);
            yield return siteId;
        }
    }
}
