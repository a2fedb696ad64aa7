namespace ForecastHub.Storage.Sites;

/// <summary>Sites and their settings.</summary>
public interface ISiteStore
{
    /// <summary>Stores a new site; false when the id is taken.</summary>
    Task<bool> CreateAsync(SiteRecord site, CancellationToken cancellationToken = default);

    Task<SiteRecord?> GetAsync(string id, CancellationToken cancellationToken = default);

    /// <summary>Sites ordered by id, starting after <paramref name="afterId"/> (exclusive).</summary>
    Task<IReadOnlyList<SiteRecord>> ListAsync(string? afterId, int limit, CancellationToken cancellationToken = default);

    /// <summary>
    /// Reads the site and writes what <paramref name="change"/> makes of it, as one write, so two
    /// changes never overwrite each other. <paramref name="change"/> returns null to leave the site
    /// as it is. Answers the stored site, or null when it does not exist. The settings version
    /// goes up when anything but the name changed.
    /// </summary>
    Task<SiteRecord?> UpdateAsync(string id, Func<SiteRecord, SiteRecord?> change, CancellationToken cancellationToken = default);

    /// <summary>Deletes the site with all its readings; false when it does not exist.</summary>
    Task<bool> DeleteAsync(string id, CancellationToken cancellationToken = default);
}
