namespace ForecastHub.Core.Alerts;

/// <summary>A threshold's risk over one window, as evaluated now; only thresholds with an alert level take part.</summary>
public sealed record WindowRiskLevel(
    string ThresholdId,
    string WindowName,
    DateTimeOffset From,
    DateTimeOffset To,
    double Probability,
    double AlertProbability);

/// <summary>A raised alert as remembered: its threshold, window name and the window it was last evaluated for.</summary>
public sealed record RaisedWindow(string ThresholdId, string WindowName, DateTimeOffset From, DateTimeOffset To);

/// <summary>Why a raised risk cleared, as the <c>risk.cleared</c> event names it.</summary>
public static class ClearReason
{
    public const string BelowClearLevel = "below-clear-level";
    public const string WindowPassed = "window-passed";
    public const string ThresholdRemoved = "threshold-removed";
}

/// <summary>What an evaluation does: raises (send <c>risk.raised</c>), clears (send <c>risk.cleared</c>
/// with a reason), and refreshes (keep raised, update the remembered figures, send nothing).</summary>
public sealed record AlertDecisions(
    IReadOnlyList<WindowRiskLevel> Raises,
    IReadOnlyList<(RaisedWindow Alert, string Reason, WindowRiskLevel? Latest)> Clears,
    IReadOnlyList<WindowRiskLevel> Refreshes);

/// <summary>
/// The raise-once, clear-with-hysteresis rules of DESIGN section 10. A risk is raised when its
/// probability reaches the threshold's alert level and stays raised (nothing more is sent) until
/// the probability falls below <see cref="ClearFactor"/> x that level, the window it was raised for
/// has passed, or the threshold no longer alerts. A new window (the next night) may raise again.
/// </summary>
public static class AlertRules
{
    /// <summary>Clearing below 0.8 x the alert level keeps a probability hovering at the level from raising and clearing on every refresh.</summary>
    public const double ClearFactor = 0.8;

    /// <param name="raised">What is raised now.</param>
    /// <param name="evaluated">The site's current risks, or null when no risk could be computed (no model yet):
    /// then only windows that have passed clear, and nothing is raised.</param>
    /// <param name="now">The evaluation time.</param>
    public static AlertDecisions Decide(IReadOnlyList<RaisedWindow> raised, IReadOnlyList<WindowRiskLevel>? evaluated, DateTimeOffset now)
    {
        ArgumentNullException.ThrowIfNull(raised);
        var raises = new List<WindowRiskLevel>();
        var clears = new List<(RaisedWindow, string, WindowRiskLevel?)>();
        var refreshes = new List<WindowRiskLevel>();
        var stillRaised = new HashSet<(string, string)>();

        foreach (var alert in raised)
        {
            var latest = evaluated?.FirstOrDefault(r => r.ThresholdId == alert.ThresholdId && r.WindowName == alert.WindowName);
            if (now >= alert.To || (latest is not null && latest.From >= alert.To))
            {
                clears.Add((alert, ClearReason.WindowPassed, latest));
            }
            else if (evaluated is null)
            {
                stillRaised.Add((alert.ThresholdId, alert.WindowName));
            }
            else if (latest is null)
            {
                clears.Add((alert, ClearReason.ThresholdRemoved, null));
            }
            else if (latest.Probability < ClearFactor * latest.AlertProbability)
            {
                clears.Add((alert, ClearReason.BelowClearLevel, latest));
            }
            else
            {
                refreshes.Add(latest);
                stillRaised.Add((alert.ThresholdId, alert.WindowName));
            }
        }

        foreach (var risk in evaluated ?? [])
        {
            if (!stillRaised.Contains((risk.ThresholdId, risk.WindowName)) && risk.Probability >= risk.AlertProbability && now < risk.To)
            {
                raises.Add(risk);
            }
        }

        return new AlertDecisions(raises, clears, refreshes);
    }
}
