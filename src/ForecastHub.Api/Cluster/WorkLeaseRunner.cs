using ForecastHub.Storage.Cluster;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Cluster;

/// <summary>
/// Runs a piece of background work under its lease, so it runs on one node at a time across the
/// cluster: skipped when another node holds the lease, renewed every third of the lease while it
/// runs, given up when done. A node that dies stops renewing, and another takes over once the
/// lease runs out. With SQLite the leases live in this process, and the one node always gets them.
/// </summary>
public sealed partial class WorkLeaseRunner(IWorkLeases leases, IOptions<ClusterOptions> options, TimeProvider clock, ILogger<WorkLeaseRunner> logger)
{
    public string NodeName { get; } = options.Value.ResolvedNodeName;

    /// <summary>Runs <paramref name="work"/> when this node gets the lease; false when another node holds it.</summary>
    public async Task<bool> RunAsync(string kind, string subject, Func<CancellationToken, Task> work, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(work);
        var duration = options.Value.LeaseDuration;
        if (!await leases.TryTakeAsync(kind, subject, NodeName, duration, cancellationToken))
        {
            return false;
        }

        using var stopRenewing = CancellationTokenSource.CreateLinkedTokenSource(cancellationToken);
        var renewal = RenewAsync(kind, subject, duration, stopRenewing.Token);
        try
        {
            await work(cancellationToken);
        }
        finally
        {
            await stopRenewing.CancelAsync();
            await renewal;
            await leases.ReleaseAsync(kind, subject, NodeName, CancellationToken.None);
        }

        return true;
    }

    /// <summary>Takes the lease for <paramref name="duration"/> and keeps it (no release): "done for this period" across the cluster.</summary>
    public Task<bool> ClaimAsync(string kind, string subject, TimeSpan duration, CancellationToken cancellationToken) =>
        leases.TryTakeAsync(kind, subject, NodeName, duration, cancellationToken);

    private async Task RenewAsync(string kind, string subject, TimeSpan duration, CancellationToken stop)
    {
        try
        {
            while (true)
            {
                await Task.Delay(duration / 3, clock, stop);
                if (!await leases.TryTakeAsync(kind, subject, NodeName, duration, stop))
                {
                    LogLeaseLost(logger, kind, subject);
                    return;
                }
            }
        }
        catch (OperationCanceledException)
        {
            // The work finished.
        }
#pragma warning disable CA1031 // A failed renewal must not fault the work; the lease then runs out and another node may take over.
        catch (Exception error)
#pragma warning restore CA1031
        {
            LogRenewFailed(logger, error, kind, subject);
        }
    }

    [LoggerMessage(Level = LogLevel.Warning, Message = "Lease on {Kind} {Subject} was taken over by another node while the work ran")]
    private static partial void LogLeaseLost(ILogger logger, string kind, string subject);

    [LoggerMessage(Level = LogLevel.Warning, Message = "Renewing the lease on {Kind} {Subject} failed")]
    private static partial void LogRenewFailed(ILogger logger, Exception error, string kind, string subject);
}
