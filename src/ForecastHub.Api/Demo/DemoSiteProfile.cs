namespace ForecastHub.Api.Demo;

/// <summary>What makes one invented demo logger behave the way it does.</summary>
/// <param name="Id">Site id (slug).</param>
/// <param name="Name">Display name.</param>
/// <param name="ElevationM">Height of the logger above sea level, metres.</param>
/// <param name="Kind">Orchard air, polytunnel air or cold-store air.</param>
/// <param name="AnnualMeanC">Mean of the annual cycle, degrees C.</param>
/// <param name="AnnualAmplitudeC">Half the winter-to-summer swing of the daily mean, degrees C.</param>
/// <param name="DiurnalAmplitudeC">Size of the daily cycle (its main harmonic), degrees C.</param>
/// <param name="WeatherGain">How strongly the farm-wide weather anomaly reaches this logger.</param>
/// <param name="FrostTargetC">Lowest temperature on the frost night (orchard loggers only).</param>
/// <param name="Faults">The faults this logger shows.</param>
public sealed record DemoSiteProfile(
    string Id,
    string Name,
    double ElevationM,
    DemoSiteKind Kind,
    double AnnualMeanC,
    double AnnualAmplitudeC,
    double DiurnalAmplitudeC,
    double WeatherGain,
    double? FrostTargetC,
    DemoFaults Faults);

/// <summary>The kind of air a demo logger measures.</summary>
public enum DemoSiteKind
{
    Orchard,
    Tunnel,
    ColdStore,
}

/// <summary>Faults planted in a demo series, each in hours or days before "now".</summary>
/// <param name="GapStartDaysAgo">Start of a multi-day outage, days before now (null: none).</param>
/// <param name="GapHours">Length of that outage, hours.</param>
/// <param name="SilentLastHours">The newest hours that never arrived (radio link down).</param>
/// <param name="StuckLastHours">The newest hours repeat one value (stuck sensor).</param>
/// <param name="SpikeDaysAgo">One implausible jump, days before now (null: none).</param>
/// <param name="HistoryDays">Days of history this logger has (shorter for a new logger).</param>
public sealed record DemoFaults(
    int? GapStartDaysAgo = null,
    int GapHours = 0,
    int SilentLastHours = 0,
    int StuckLastHours = 0,
    int? SpikeDaysAgo = null,
    int? HistoryDays = null);
