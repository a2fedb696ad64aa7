namespace ForecastHub.Core.Health;

/// <summary>Model-health states of DESIGN section 6, as they appear on the wire.</summary>
public static class HealthState
{
    public const string Ok = "ok";
    public const string WarmingUp = "warming-up";
    public const string Stale = "stale";
    public const string Drifting = "drifting";
    public const string SensorSuspect = "sensor-suspect";

    /// <summary>All states, most urgent first; the order the fleet summary reports them in.</summary>
    public static IReadOnlyList<string> All { get; } = [SensorSuspect, Stale, WarmingUp, Drifting, Ok];

    /// <summary>Lower is more urgent.</summary>
    public static int Urgency(string state) => state switch
    {
        SensorSuspect => 0,
        Stale => 1,
        WarmingUp => 2,
        Drifting => 3,
        Ok => 4,
        _ => throw new ArgumentOutOfRangeException(nameof(state), state, "unknown health state"),
    };
}
