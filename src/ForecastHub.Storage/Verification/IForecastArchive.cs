namespace ForecastHub.Storage.Verification;

/// <summary>A day-ahead forecast as first issued for its local target day (forecast as JSON), of the site with this id and internal key.</summary>
public sealed record ArchivedForecast(
    string SiteId,
    long SiteKey,
    DateOnly TargetDate,
    DateTimeOffset IssuedAt,
    DateTimeOffset Origin,
    DateTimeOffset ModelFittedAt,
    string ForecastJson);

/// <summary>The scores of one archived forecast once its day was observed (scores as JSON), of the site with this id and internal key.</summary>
public sealed record LiveScore(string SiteId, long SiteKey, DateOnly TargetDate, DateTimeOffset ScoredAt, string ScoresJson);

/// <summary>Archived day-ahead forecasts and their live scores.</summary>
public interface IForecastArchive
{
    /// <summary>Keeps the first forecast issued for its target day; true when this one was stored, false when one was already there or no site has its id and key (deleted since).</summary>
    Task<bool> ArchiveAsync(ArchivedForecast forecast, CancellationToken cancellationToken = default);

    /// <summary>Archived forecasts that have no score yet, oldest first, at most <paramref name="limit"/>.</summary>
    Task<IReadOnlyList<ArchivedForecast>> ListUnscoredAsync(string siteId, int limit, CancellationToken cancellationToken = default);

    /// <summary>Stores the score of an archived day; a second score for the same day replaces the first. False when no site has its id and key.</summary>
    Task<bool> SaveScoreAsync(LiveScore score, CancellationToken cancellationToken = default);

    /// <summary>Scores of target days on or after <paramref name="fromDate"/>, newest first, at most <paramref name="limit"/>.</summary>
    Task<IReadOnlyList<LiveScore>> ListScoresAsync(string siteId, DateOnly fromDate, int limit, CancellationToken cancellationToken = default);

    /// <summary>True when a forecast for this site and target day is archived.</summary>
    Task<bool> HasArchivedAsync(string siteId, DateOnly targetDate, CancellationToken cancellationToken = default);
}
