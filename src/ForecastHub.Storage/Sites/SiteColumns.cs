using System.Text.Json;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Risk;
using ForecastHub.Core.Settings;

namespace ForecastHub.Storage.Sites;

/// <summary>A site's typed settings as the words every backend stores in its row (the wire words of
/// <see cref="WireNames"/>, so a row reads the same in any tool), and back.</summary>
public static class SiteColumns
{
    public static string Cadence(SiteRecord site) => WireNames.Cadences.Of(Site(site).Cadence);

    public static string? DailyStatistic(SiteRecord site) =>
        Site(site).DailyStatistic is { } statistic ? WireNames.DailyStatistics.Of(statistic) : null;

    public static string Seasonality(SiteRecord site) => WireNames.Seasonalities.Of(Site(site).Model.Seasonality);

    public static string Method(SiteRecord site) => WireNames.Methods.Of(Site(site).Model.Method);

    public static string OrderPolicy(SiteRecord site) => WireNames.OrderPolicies.Of(Site(site).Model.OrderPolicy);

    public static string IntervalMethod(SiteRecord site) => WireNames.IntervalMethods.Of(Site(site).Model.IntervalMethod);

    public static GridCadence ReadCadence(string word) => WireNames.Cadences.Parse(word);

    public static DailyStatistic? ReadDailyStatistic(string? word) => word is null ? null : WireNames.DailyStatistics.Parse(word);

    public static ModelSettings ReadModel(string seasonality, string method, string orderPolicy, int maxOrder, int fitWindowDays, string intervalMethod) => new()
    {
        Seasonality = WireNames.Seasonalities.Parse(seasonality),
        Method = WireNames.Methods.Parse(method),
        OrderPolicy = WireNames.OrderPolicies.Parse(orderPolicy),
        MaxOrder = maxOrder,
        FitWindowDays = fitWindowDays,
        IntervalMethod = WireNames.IntervalMethods.Parse(intervalMethod),
    };

    /// <summary>The thresholds as a JSON array of {id, direction, valueC, alertProbability} with the wire words.</summary>
    public static string Thresholds(SiteRecord site) => JsonSerializer.Serialize(
        Site(site).Risk.Thresholds.Select(t => new ThresholdRow(t.Id, WireNames.ThresholdDirections.Of(t.Direction), t.ValueC, t.AlertProbability)), Json);

    public static string NightStart(SiteRecord site) => WireNames.ClockTime(Site(site).Risk.Night.Start);

    public static string NightEnd(SiteRecord site) => WireNames.ClockTime(Site(site).Risk.Night.End);

    public static SiteRiskSettings ReadRisk(string thresholdsJson, string nightStart, string nightEnd) => new(
        [.. (JsonSerializer.Deserialize<ThresholdRow[]>(thresholdsJson, Json) ?? [])
            .Select(t => new SiteThreshold(t.Id, WireNames.ThresholdDirections.Parse(t.Direction), t.ValueC, t.AlertProbability))],
        new NightHours(WireNames.ParseClockTime(nightStart), WireNames.ParseClockTime(nightEnd)));

    private static readonly JsonSerializerOptions Json = new(JsonSerializerDefaults.Web);

    private sealed record ThresholdRow(string Id, string Direction, double ValueC, double? AlertProbability);

    private static SiteRecord Site(SiteRecord site) => site ?? throw new ArgumentNullException(nameof(site));
}
