using System.Text.Json;
using ForecastHub.Api.Forecasts;
using ForecastHub.Api.Webhooks;
using ForecastHub.Core.Health;
using ForecastHub.Storage.Webhooks;

namespace ForecastHub.Api.Alerts;

/// <summary>The window an alert is about.</summary>
public sealed record AlertWindow(string Name, DateTimeOffset From, DateTimeOffset To);

/// <summary>
/// A risk as an event and the alert list carry it: the site, the threshold, the window, the chance
/// of at least one crossing in it, the first crossing, the forecast origin it comes from, the
/// forecast's confidence, and the cautions. <c>reason</c> is set on <c>risk.cleared</c> only.
/// </summary>
public sealed record RiskAlert(
    string SiteId,
    string SiteName,
    AlertThreshold Threshold,
    AlertWindow Window,
    double Probability,
    FirstCrossing? FirstCrossing,
    DateTimeOffset Origin,
    string Confidence,
    string? ConfidenceReason,
    string? Reason,
    IReadOnlyList<string> Cautions);

/// <summary>A change of a site's health state; <c>previous</c> is the state announced before.</summary>
public sealed record HealthChange(
    string SiteId,
    string SiteName,
    string Previous,
    string State,
    IReadOnlyList<HealthChangeReason> Reasons,
    IReadOnlyList<string> Cautions);

public sealed record HealthChangeReason(string Code, string Message);

/// <summary>The Standard Webhooks payload shape: <c>type</c>, <c>timestamp</c>, <c>data</c>.</summary>
public sealed record EventEnvelope<T>(string Type, DateTimeOffset Timestamp, T Data);

/// <summary>Builds the events alerting sends, as the JSON bodies the outbox stores.</summary>
public static class AlertEvents
{
    public static readonly JsonSerializerOptions Json = new(JsonSerializerDefaults.Web);

    public static RiskAlert Risk(Storage.Sites.SiteRecord site, SiteAlertRisk risk, ThresholdWindowRisk window)
    {
        ArgumentNullException.ThrowIfNull(site);
        ArgumentNullException.ThrowIfNull(risk);
        ArgumentNullException.ThrowIfNull(window);
        return new RiskAlert(site.Id, site.Name, window.Threshold, new AlertWindow(window.Window, window.From, window.To),
            window.Probability, window.FirstCrossing, risk.Origin, risk.Confidence, risk.ConfidenceReason, null, ForecastCautions.All);
    }

    public static OutgoingEvent Raised(RiskAlert alert, DateTimeOffset at) =>
        Envelope(WebhookEvents.Risk, WebhookEvents.RiskRaised, alert.SiteId, alert, at);

    public static OutgoingEvent Cleared(RiskAlert alert, string reason, DateTimeOffset at) =>
        Envelope(WebhookEvents.Risk, WebhookEvents.RiskCleared, alert.SiteId, alert with { Reason = reason }, at);

    public static OutgoingEvent HealthChanged(Storage.Sites.SiteRecord site, string previous, HealthAssessment now, DateTimeOffset at)
    {
        ArgumentNullException.ThrowIfNull(site);
        ArgumentNullException.ThrowIfNull(now);
        var change = new HealthChange(site.Id, site.Name, previous, now.State,
            now.Reasons.Select(r => new HealthChangeReason(r.Code, r.Message)).ToList(), ForecastCautions.All);
        return Envelope(WebhookEvents.Health, WebhookEvents.HealthChanged, site.Id, change, at);
    }

    private static OutgoingEvent Envelope<T>(string family, string type, string siteId, T data, DateTimeOffset at) =>
        new(family, type, siteId, JsonSerializer.Serialize(new EventEnvelope<T>(type, at, data), Json));
}
