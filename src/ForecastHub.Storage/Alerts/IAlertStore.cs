namespace ForecastHub.Storage.Alerts;

/// <summary>Alert state per site, changed together with the outbox so that an event is queued
/// exactly when the state that records it is written. Deleting a site forgets its state.</summary>
public interface IAlertStore
{
    /// <summary>Holds the site's evaluation lock until disposed, so that across every process sharing
    /// the storage one evaluation of a site reads, decides and applies before the next one reads.</summary>
    Task<IAsyncDisposable> LockAsync(string siteId, CancellationToken cancellationToken = default);

    Task<SiteAlertState> GetAsync(string siteId, CancellationToken cancellationToken = default);

    /// <summary>Applies the change and queues its events for every covering webhook, due at <paramref name="at"/>.
    /// Does nothing when no site has the change's id and key (deleted, or deleted and created again, during the
    /// evaluation); answers whether it applied.</summary>
    Task<bool> ApplyAsync(SiteAlertChange change, DateTimeOffset at, CancellationToken cancellationToken = default);

    /// <summary>Raised alerts across the fleet, ordered by site, threshold and window, after the given key (exclusive).</summary>
    Task<IReadOnlyList<RaisedAlert>> ListRaisedAsync((string SiteId, string ThresholdId, string WindowName)? after, int limit,
        CancellationToken cancellationToken = default);
}
