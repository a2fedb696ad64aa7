namespace ForecastHub.Storage.Cluster;

/// <summary>Leases held in this process: right for SQLite, where one process owns the database file.</summary>
public sealed class LocalWorkLeases(TimeProvider clock) : IWorkLeases
{
    private readonly Lock gate = new();
    private readonly Dictionary<(string Kind, string Subject), (string Holder, DateTimeOffset ExpiresAt)> leases = [];

    public Task<bool> TryTakeAsync(string kind, string subject, string holder, TimeSpan duration, CancellationToken cancellationToken = default)
    {
        var now = clock.GetUtcNow();
        lock (gate)
        {
            if (leases.TryGetValue((kind, subject), out var lease) && lease.Holder != holder && lease.ExpiresAt > now)
            {
                return Task.FromResult(false);
            }
            leases[(kind, subject)] = (holder, now + duration);
            return Task.FromResult(true);
        }
    }

    public Task ReleaseAsync(string kind, string subject, string holder, CancellationToken cancellationToken = default)
    {
        lock (gate)
        {
            if (leases.TryGetValue((kind, subject), out var lease) && lease.Holder == holder)
            {
                leases.Remove((kind, subject));
            }
        }
        return Task.CompletedTask;
    }
}
