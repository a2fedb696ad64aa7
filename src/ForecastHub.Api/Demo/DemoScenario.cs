namespace ForecastHub.Api.Demo;

/// <summary>
/// The invented demo: Ambrel Hill fruit farm above the (equally invented) village of
/// Cotterwick, with orchard loggers at three heights, a polytunnel and a cold store.
/// </summary>
public static class DemoScenario
{
    public const string FarmName = "Ambrel Hill fruit farm";
    public const string TimeZone = "Europe/London";
    public const int HistoryDays = 400;
    public const int DefaultSeed = 20_417;

    /// <summary>Five loggers, each showing something a grower meets in real data.</summary>
    public static IReadOnlyList<DemoSiteProfile> Sites { get; } =
    [
        // Frost pocket: cold air drains downhill on clear nights.
        new("ambrel-low", "Low orchard, valley floor", 112, DemoSiteKind.Orchard,
            AnnualMeanC: 9.6, AnnualAmplitudeC: 6.8, DiurnalAmplitudeC: 5.2, WeatherGain: 1.15,
            FrostTargetC: -4.6, new DemoFaults()),
        // Battery swap came late: a five-day hole in the history, and one bird-strike spike.
        new("ambrel-mid", "Middle terrace", 148, DemoSiteKind.Orchard,
            AnnualMeanC: 9.8, AnnualAmplitudeC: 6.5, DiurnalAmplitudeC: 4.2, WeatherGain: 1.0,
            FrostTargetC: -2.4, new DemoFaults(GapStartDaysAgo: 63, GapHours: 5 * 24 + 6, SpikeDaysAgo: 121)),
        // Radio link down since the early hours: the newest readings never arrived.
        new("ambrel-top", "Top orchard, ridge", 191, DemoSiteKind.Orchard,
            AnnualMeanC: 9.4, AnnualAmplitudeC: 6.2, DiurnalAmplitudeC: 3.4, WeatherGain: 0.9,
            FrostTargetC: -0.9, new DemoFaults(SilentLastHours: 9)),
        // Sensor stuck: the newest readings repeat one value exactly.
        new("ambrel-store", "Cold store 2", 120, DemoSiteKind.ColdStore,
            AnnualMeanC: 1.4, AnnualAmplitudeC: 0.25, DiurnalAmplitudeC: 0.3, WeatherGain: 0.0,
            FrostTargetC: null, new DemoFaults(StuckLastHours: 14)),
        // Logger installed this week: too little data to fit a model yet.
        new("ambrel-tunnel", "Strawberry tunnel", 118, DemoSiteKind.Tunnel,
            AnnualMeanC: 12.5, AnnualAmplitudeC: 7.0, DiurnalAmplitudeC: 7.5, WeatherGain: 0.8,
            FrostTargetC: null, new DemoFaults(HistoryDays: 4)),
    ];
}
