namespace ForecastHub.Storage.Models;

/// <summary>A site's serving model as stored: the model itself is JSON the storage does not read.
/// <c>SiteKey</c> is the internal key (<see cref="Sites.SiteRecord.Key"/>) of the site it was fitted for.</summary>
public sealed record StoredModel(
    string SiteId,
    long SiteKey,
    DateTimeOffset FittedAt,
    double FitDurationMs,
    long SettingsVersion,
    DateTimeOffset DataEnd,
    int DataPoints,
    double? ResidualPValue,
    string ModelJson);

/// <summary>The last fit attempt of a site (by id and internal key); <c>Error</c> is set when it failed.</summary>
public sealed record FitAttempt(string SiteId, long SiteKey, DateTimeOffset AttemptedAt, bool Failed, string? Error);

/// <summary>Serving models and fit attempts, one of each per site.</summary>
public interface IModelStore
{
    /// <summary>Null when the site has no model (or does not exist).</summary>
    Task<StoredModel?> GetAsync(string siteId, CancellationToken cancellationToken = default);

    /// <summary>Replaces the site's serving model and records a successful attempt. False, storing nothing, when no
    /// site has both the model's id and key: the site it was fitted for was deleted (and perhaps created again).</summary>
    Task<bool> SaveAsync(StoredModel model, CancellationToken cancellationToken = default);

    /// <summary>Records a failed attempt; the serving model stays. False when no site has the attempt's id and key.</summary>
    Task<bool> RecordFailureAsync(FitAttempt attempt, CancellationToken cancellationToken = default);

    Task<FitAttempt?> GetLastAttemptAsync(string siteId, CancellationToken cancellationToken = default);

    /// <summary>The fitted-at time, settings version and data end of every site's model, for the refit sweep and start-up.</summary>
    Task<IReadOnlyList<ModelSummary>> ListSummariesAsync(CancellationToken cancellationToken = default);

    /// <summary>The bookkeeping of one site's model without its JSON; null when it has none.</summary>
    Task<ModelSummary?> GetSummaryAsync(string siteId, CancellationToken cancellationToken = default);
}

/// <summary>A model's bookkeeping without its JSON.</summary>
public sealed record ModelSummary(string SiteId, DateTimeOffset FittedAt, long SettingsVersion, DateTimeOffset DataEnd, int DataPoints, double? ResidualPValue);
