namespace ForecastHub.Storage.Cluster;

/// <summary>
/// Leases on pieces of background work, such as ("refit", site id): while one holder's lease runs,
/// no other holder gets it; a lease past its expiry may be taken by anyone, so work held by a node
/// that died is picked up once the lease runs out.
/// </summary>
public interface IWorkLeases
{
    /// <summary>Takes (or, for its own holder, extends) the lease for <paramref name="duration"/>; false when another holder's lease runs.</summary>
    Task<bool> TryTakeAsync(string kind, string subject, string holder, TimeSpan duration, CancellationToken cancellationToken = default);

    /// <summary>Gives the lease up early, when <paramref name="holder"/> still holds it.</summary>
    Task ReleaseAsync(string kind, string subject, string holder, CancellationToken cancellationToken = default);
}
