namespace ForecastHub.Api.Models;

/// <summary>Why a site is (re)fitted; the wire names appear in logs and metrics.</summary>
public enum RefitReason
{
    FirstFit,
    SettingsChanged,
    NewData,
    ModelAge,
    Requested,
}

/// <summary>What the refit decision looks at for one site.</summary>
public sealed record RefitFacts(
    bool IsDaily,
    int GridPoints,
    int MinPoints,
    long SiteSettingsVersion,
    DateTimeOffset? ModelFittedAt,
    long? ModelSettingsVersion,
    int? ModelDataPoints,
    DateTimeOffset? ModelDataEnd,
    DateTimeOffset? LastGridTime,
    DateTimeOffset Now);

/// <summary>The refit triggers as one pure decision: null means the serving model stays.</summary>
public static class RefitPolicy
{
    public static RefitReason? Decide(RefitFacts facts, RefitOptions options)
    {
        ArgumentNullException.ThrowIfNull(facts);
        ArgumentNullException.ThrowIfNull(options);
        if (facts.GridPoints < facts.MinPoints)
        {
            return null;
        }

        if (facts.ModelFittedAt is not { } fittedAt)
        {
            return RefitReason.FirstFit;
        }

        if (facts.ModelSettingsVersion != facts.SiteSettingsVersion)
        {
            return RefitReason.SettingsChanged;
        }

        var newPoints = facts.GridPoints - (facts.ModelDataPoints ?? 0);
        var threshold = facts.IsDaily ? options.NewPointsDaily : options.NewPointsHourly;
        var newerData = facts.LastGridTime is { } last && facts.ModelDataEnd is { } end && last > end;
        if (newerData && newPoints >= threshold)
        {
            return RefitReason.NewData;
        }

        return newerData && facts.Now - fittedAt > options.ModelMaxAge ? RefitReason.ModelAge : null;
    }
}
