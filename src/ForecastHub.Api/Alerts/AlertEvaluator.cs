using System.Text.Json;
using ForecastHub.Api.Health;
using ForecastHub.Api.Webhooks;
using ForecastHub.Core.Alerts;
using ForecastHub.Storage.Alerts;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Webhooks;

namespace ForecastHub.Api.Alerts;

/// <summary>
/// Evaluates one site: its health state and its threshold risks against what was last announced,
/// and stores the change together with the events it sends (<see cref="AlertRules"/> decides).
/// Evaluations run one at a time in the process and hold the store's lock on the site, so a sweep
/// and a trigger, on this node or another, never both raise.
/// </summary>
public sealed class AlertEvaluator(
    IAlertStore alerts,
    ModelHealthService health,
    ISiteRiskSource riskSource,
    WebhookDeliveryWorker deliveries,
    TimeProvider clock) : IDisposable
{
    private readonly SemaphoreSlim gate = new(1, 1);

    /// <summary>Evaluates the site; answers the number of events queued.</summary>
    public async Task<int> EvaluateAsync(SiteRecord site, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(site);
        await gate.WaitAsync(cancellationToken);
        try
        {
            await using var siteLock = await alerts.LockAsync(site.Id, cancellationToken);
            var now = clock.GetUtcNow();
            var state = await alerts.GetAsync(site.Id, cancellationToken);
            var assessment = await health.EvaluateAsync(site, cancellationToken);
            var risk = await riskSource.GetAsync(site, assessment, cancellationToken);
            var change = Change(site, state, assessment, risk, now);
            if (change.IsEmpty || !await alerts.ApplyAsync(change, now, cancellationToken))
            {
                return 0;
            }

            if (change.Events.Count > 0)
            {
                deliveries.Wake();
            }

            return change.Events.Count;
        }
        finally
        {
            gate.Release();
        }
    }

    private static SiteAlertChange Change(SiteRecord site, SiteAlertState state, Core.Health.HealthAssessment assessment, SiteAlertRisk? risk, DateTimeOffset now)
    {
        var events = new List<OutgoingEvent>();
        string? healthToStore = null;
        if (state.HealthState != assessment.State)
        {
            healthToStore = assessment.State;
            // The first look at a site records its state without announcing it: there is no change to tell.
            if (state.HealthState is not null)
            {
                events.Add(AlertEvents.HealthChanged(site, state.HealthState, assessment, now));
            }
        }

        var alerting = risk?.Windows.Where(w => w.Threshold.AlertProbability is not null).ToList();
        var levels = alerting?.Select(w => new WindowRiskLevel(w.Threshold.Id, w.Window, w.From, w.To, w.Probability, w.Threshold.AlertProbability!.Value)).ToList();
        var raised = state.Raised.Select(r => new RaisedWindow(r.ThresholdId, r.WindowName, r.WindowFrom, r.WindowTo)).ToList();
        var decisions = AlertRules.Decide(raised, levels, now);

        RiskAlert Current(WindowRiskLevel level) =>
            AlertEvents.Risk(site, risk!, alerting!.First(w => w.Threshold.Id == level.ThresholdId && w.Window == level.WindowName));

        var clears = new List<(string, string)>();
        foreach (var (alert, reason, latest) in decisions.Clears)
        {
            // A cleared event shows the latest figures when there are any, else those last announced.
            var shown = latest is not null ? Current(latest) : Stored(state, alert);
            events.Add(AlertEvents.Cleared(shown, reason, now));
            clears.Add((alert.ThresholdId, alert.WindowName));
        }

        var upserts = new List<RaisedAlert>();
        foreach (var level in decisions.Refreshes)
        {
            // Stored again only when its figures (the window's times among them) changed: a sweep that finds the same risk writes nothing.
            var previous = state.Raised.First(r => r.ThresholdId == level.ThresholdId && r.WindowName == level.WindowName);
            var refreshed = Record(site, level, Current(level), previous.RaisedAt, now);
            if (refreshed.DetailJson != previous.DetailJson)
            {
                upserts.Add(refreshed);
            }
        }

        foreach (var level in decisions.Raises)
        {
            var alert = Current(level);
            events.Add(AlertEvents.Raised(alert, now));
            // A raise for a window that just passed replaces its row, so it is not cleared as well.
            clears.RemoveAll(c => c.Item1 == level.ThresholdId && c.Item2 == level.WindowName);
            upserts.Add(Record(site, level, alert, now, now));
        }

        return new SiteAlertChange(site.Id, site.Key, upserts, clears, healthToStore, events);
    }

    private static RaisedAlert Record(SiteRecord site, WindowRiskLevel level, RiskAlert alert, DateTimeOffset raisedAt, DateTimeOffset now) =>
        new(site.Id, level.ThresholdId, level.WindowName, level.From, level.To, raisedAt, now, JsonSerializer.Serialize(alert, AlertEvents.Json));

    private static RiskAlert Stored(SiteAlertState state, RaisedWindow alert) =>
        JsonSerializer.Deserialize<RiskAlert>(
            state.Raised.First(r => r.ThresholdId == alert.ThresholdId && r.WindowName == alert.WindowName).DetailJson, AlertEvents.Json)!;

    public void Dispose() => gate.Dispose();
}
