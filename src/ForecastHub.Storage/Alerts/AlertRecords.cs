using System.Data.Common;
using ForecastHub.Storage.Webhooks;

namespace ForecastHub.Storage.Alerts;

/// <summary>A risk currently raised for one threshold and window of a site. <paramref name="DetailJson"/>
/// is the latest evaluation as the alert list shows it.</summary>
public sealed record RaisedAlert(
    string SiteId,
    string ThresholdId,
    string WindowName,
    DateTimeOffset WindowFrom,
    DateTimeOffset WindowTo,
    DateTimeOffset RaisedAt,
    DateTimeOffset UpdatedAt,
    string DetailJson)
{
    /// <summary>The columns every backend selects a raised alert by, in the order <see cref="Read"/> reads them.</summary>
    public const string Columns = "site_id, threshold_id, window_name, window_from_ms, window_to_ms, raised_at_ms, updated_at_ms, detail_json";

    public static RaisedAlert Read(DbDataReader reader)
    {
        ArgumentNullException.ThrowIfNull(reader);
        return new(
            reader.GetString(0),
            reader.GetString(1),
            reader.GetString(2),
            DateTimeOffset.FromUnixTimeMilliseconds(reader.GetInt64(3)),
            DateTimeOffset.FromUnixTimeMilliseconds(reader.GetInt64(4)),
            DateTimeOffset.FromUnixTimeMilliseconds(reader.GetInt64(5)),
            DateTimeOffset.FromUnixTimeMilliseconds(reader.GetInt64(6)),
            reader.GetString(7));
    }
}

/// <summary>The alert memory of one site: what is raised and the health state last announced.</summary>
public sealed record SiteAlertState(IReadOnlyList<RaisedAlert> Raised, string? HealthState);

/// <summary>
/// What one evaluation of a site changes, applied as one transaction: raised alerts written
/// (new or refreshed), cleared ones removed, the announced health state, and the events for the
/// outbox. A crash leaves either all of it or none of it. <c>SiteKey</c> is the internal key of the
/// site that was evaluated, so a change for a site deleted (and created again) meanwhile is refused.
/// </summary>
public sealed record SiteAlertChange(
    string SiteId,
    long SiteKey,
    IReadOnlyList<RaisedAlert> Upserts,
    IReadOnlyList<(string ThresholdId, string WindowName)> Clears,
    string? HealthState,
    IReadOnlyList<OutgoingEvent> Events)
{
    public bool IsEmpty => Upserts.Count == 0 && Clears.Count == 0 && HealthState is null && Events.Count == 0;

    /// <summary>A change that sends nothing (refreshed figures, the first look at a health state) can be lost in a
    /// crash without harm: the next evaluation makes it again, so a store need not wait for the disk to commit it.</summary>
    public bool IsRecomputable => Events.Count == 0;
}
