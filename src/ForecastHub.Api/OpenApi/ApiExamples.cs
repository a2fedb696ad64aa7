using ForecastHub.Api.Alerts;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Forecasts;
using ForecastHub.Api.Health;
using ForecastHub.Api.Keys;
using ForecastHub.Api.Models;
using ForecastHub.Api.Observations;
using ForecastHub.Api.Sites;
using ForecastHub.Api.Verification;
using ForecastHub.Api.Webhooks;
using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Forecasting;
using ForecastHub.Core.Health;
using MathNet.Numerics.Distributions;

namespace ForecastHub.Api.OpenApi;

/// <summary>
/// The OpenAPI document's success examples as typed records of the contract, so an example cannot
/// name a field the answer does not have. Values are invented: the low orchard logger of the demo's
/// fruit farm on a clear March night (UTC, which is local time there in March), a frost risk building
/// after midnight. Derived values (intervals, probabilities, roots) are computed as the service does.
/// </summary>
public static class ApiExamples
{
    public const string SiteId = "ambrel-low";
    private const string SiteName = "Low orchard, valley floor";
    private const string TimeZone = "Europe/London";

    // The forecast's origin: the newest grid step with data.
    private static readonly DateTimeOffset Origin = new(2025, 3, 14, 21, 0, 0, TimeSpan.Zero);
    private static readonly DateTimeOffset IssuedAt = Origin.AddMinutes(7);
    private static readonly DateTimeOffset FittedAt = new(2025, 3, 14, 3, 12, 41, TimeSpan.Zero);
    private static readonly DateTimeOffset CreatedAt = new(2024, 2, 2, 9, 30, 0, TimeSpan.Zero);
    private static readonly double[] Levels = [80, 95];

    // Six hourly steps after the origin: a cooling clear night, spread growing with the horizon.
    private static readonly (double Mean, double Sd)[] Path = [(3.1, 0.55), (2.4, 0.78), (1.8, 0.95), (1.2, 1.08), (0.7, 1.19), (0.3, 1.28)];

    /// <summary>The example of each contract type that has one.</summary>
    public static IReadOnlyDictionary<Type, object> ByType { get; } = new Dictionary<Type, object>
    {
        [typeof(SiteBody)] = NewSite,
        [typeof(SiteResponse)] = Site,
        [typeof(SiteList)] = new SiteList([new ListedSiteResponse(Site, "ok")], $"/api/v1/sites?after={SiteId}&limit=1"),
        [typeof(ObservationsBody)] = new ObservationsBody("C", [new ReadingBody("2025-03-14T20:00:00Z", 4.2), new ReadingBody("2025-03-14T21:00:00Z", 3.6)]),
        [typeof(ObservationsAnswer)] = new ObservationsAnswer(2, 0, 0, 0, []),
        [typeof(ObservationPage)] = new ObservationPage(SiteId, "raw", "C",
            [
                new ObservationDto("2025-03-14T20:00:00Z", 4.2, 4.2, "C", []),
                new ObservationDto("2025-03-14T20:30:00Z", 3.78, 38.8, "F", []),
                new ObservationDto("2025-03-14T21:00:00Z", 3.6, 3.6, "C", []),
            ],
            $"/api/v1/sites/{SiteId}/observations?limit=3&cursor={Origin.ToUnixTimeMilliseconds()}"),
        [typeof(GridPage)] = new GridPage(SiteId, "grid", "hourly", TimeZone, "C",
            [new GridPointDto("2025-03-14T19:00:00Z", 4.9, false), new GridPointDto("2025-03-14T20:00:00Z", 4.1, true), new GridPointDto("2025-03-14T21:00:00Z", 3.6, false)],
            null),
        [typeof(ModelResponse)] = Model(),
        [typeof(ForecastResponse)] = Forecast,
        [typeof(VerificationResponse)] = Verification(),
        [typeof(SiteHealthResponse)] = new SiteHealthResponse("ok", [], Origin.AddMinutes(2), FittedAt),
        [typeof(FleetHealthResponse)] = new FleetHealthResponse(IssuedAt, 5,
            HealthState.All.ToDictionary(s => s, s => s switch { HealthState.Ok => 3, HealthState.WarmingUp or HealthState.SensorSuspect => 1, _ => 0 }),
            [new AttentionItem("ambrel-store", HealthState.SensorSuspect,
                [new HealthReasonResponse(HealthReasonCode.FlatLine, "The newest readings form a flat line; check that the sensor is still measuring.")])],
            false),
        [typeof(LiveStatus)] = new LiveStatus("live"),
        [typeof(ReadyStatus)] = new ReadyStatus("ready", Storage.Migrations.Migration.All[^1].Version, new MqttStatus("off", null, null)),
        [typeof(AlertList)] = new AlertList([new RaisedAlertResponse(Alert, IssuedAt, IssuedAt)], null, ForecastCautions.All),
        [typeof(KeyBody)] = new KeyBody("ingest", [SiteId], "low orchard logger"),
        [typeof(CreatedKeyResponse)] = new CreatedKeyResponse(KeyId, ApiKeySecrets.Prefix + Secret("key").TrimEnd('=').Replace('+', '-').Replace('/', '_'), "ingest", [SiteId], "low orchard logger", CreatedAt),
        [typeof(KeyResponse)] = Key,
        [typeof(KeyList)] = new KeyList([Key], null),
        [typeof(WebhookBody)] = new WebhookBody(HookUrl, [SiteId], [WebhookEvents.Risk]),
        [typeof(CreatedWebhookResponse)] = new CreatedWebhookResponse(HookId, HookUrl, [SiteId], [WebhookEvents.Risk], WebhookSecrets.Prefix + Secret("webhook"), CreatedAt),
        [typeof(WebhookResponse)] = Hook,
        [typeof(WebhookList)] = new WebhookList([Hook], null),
        [typeof(DeliveryList)] = new DeliveryList(
            [new DeliveryResponse("msg_2e4f6a8b0c1d3e5f", WebhookEvents.RiskRaised, SiteId, "delivered", 1, IssuedAt, IssuedAt.AddSeconds(1), null, 200, null)],
            null),
    };

    /// <summary>The forecast as <c>format=csv</c> answers it, with the query's <c>below=0</c>.</summary>
    public static string ForecastCsvText => ForecastCsv.Write(Forecast, [0], []);

    /// <summary>The chart of the example forecast after six hours of history.</summary>
    public static string ForecastSvg => ForecastChart.Render(
        ForecastChart.Title(SiteName, Origin), "°C",
        [.. new[] { 7.4, 6.8, 6.1, 5.3, 4.9, 4.1, 3.6 }.Select((v, i) => new ChartPoint(Origin.AddHours(i - 6), v))],
        [.. Forecast.Steps.Select(s => new ChartStep(s.Time, s.Mean, s.Intervals.ToDictionary(i => (int)i.Level, i => (i.Lower, i.Upper))))]);

    private const string KeyId = "key-3f9a1c7e5b2d4068";
    private const string HookId = "wh-8c2e4a6f0b1d3957";
    private const string HookUrl = "https://ops.ambrel-farm.example/hooks/forecasthub";

    // Secrets of the real length and alphabet, never of a real key: 32 bytes hashed from a word.
    private static string Secret(string word) => Convert.ToBase64String(System.Security.Cryptography.SHA256.HashData(System.Text.Encoding.UTF8.GetBytes("example " + word)));

    private static SiteBody NewSite => new(SiteId, SiteName, TimeZone, "hourly", null, 52.0412, -2.1187, 112,
        new QualityBody(-25, 40, 8, 6), new ModelBody("auto", "burg", "pacf-aic", 24, 365, "calibrated"),
        [new ThresholdBody("frost", "below", 0, 0.3), new ThresholdBody("hard-frost", "below", -2, 0.2)], new NightBody("18:00", "08:00"));

    private static SiteResponse Site => new(SiteId, SiteName, TimeZone, "hourly", null, 52.0412, -2.1187, 112,
        new QualityResponse(-25, 40, 8, 6), new SiteModelSettingsResponse("auto", "burg", "pacf-aic", 24, 365, "calibrated"),
        CreatedAt, CreatedAt, 1,
        [new ThresholdResponse("frost", "below", 0, 0.3), new ThresholdResponse("hard-frost", "below", -2, 0.2)], new NightResponse("18:00", "08:00"));

    private static KeyResponse Key => new(KeyId, "ingest", [SiteId], "low orchard logger", CreatedAt, null);

    private static WebhookResponse Hook => new(HookId, HookUrl, [SiteId], [WebhookEvents.Risk], CreatedAt);

    private static ForecastInterval[] Intervals(double mean, double sd) =>
        [.. Levels.Select(level => GaussianInterval.Of(mean, sd, level / 100)).Select(i => new ForecastInterval(i.Level * 100, Math.Round(i.Lower, 2), Math.Round(i.Upper, 2)))];

    private static double Below(double threshold, double mean, double sd) => Math.Round(Normal.CDF(mean, sd, threshold), 3);

    private static ForecastResponse Forecast => new(
        SiteId, IssuedAt, Origin, "C", "ok",
        new ForecastModelUsed(2, "burg", FittedAt, "calibrated"),
        [.. Path.Select((p, i) => new ForecastStepResponse(Origin.AddHours(i + 1), p.Mean, p.Sd, Intervals(p.Mean, p.Sd),
            [new StepProbabilityResponse("frost", 0, "below", Below(0, p.Mean, p.Sd))]))],
        new NextDaySummaryResponse(new DateOnly(2025, 3, 15),
            new DaySummaryValue(-0.8, Intervals(-0.8, 1.4)), new DaySummaryValue(11.6, Intervals(11.6, 1.7)), new DaySummaryValue(5.2, Intervals(5.2, 1.1)),
            [new ThresholdProbabilityResponse(0, "below", Below(0, -0.8, 1.4))]),
        [
            new RiskResponse("frost", 0, "below", 0.3, new RiskWindowResponse("night", Origin.AddHours(-3), Origin.AddHours(11)), 0.71,
                new CrossingResponse(Origin.AddHours(7), Origin.AddHours(5), Origin.AddHours(9)), 3.4, new DaySummaryValue(-0.8, Intervals(-0.8, 1.4))),
        ],
        "normal", null, null, ForecastCautions.All);

    private static RiskAlert Alert => new(SiteId, SiteName, new AlertThreshold("frost", "below", 0, 0.3),
        new AlertWindow("night", Origin.AddHours(-3), Origin.AddHours(11)), 0.71,
        new FirstCrossing(Origin.AddHours(7), Origin.AddHours(5), Origin.AddHours(9)), Origin, "normal", null, null, ForecastCautions.All);

    private static ModelResponse Model()
    {
        // An AR(2) on the anomalies, as an orchard's hourly series typically gives; roots from the coefficients as the fit reports them.
        double[] phi = [1.12, -0.21];
        var roots = CharacteristicRoots.Of(phi);
        return new ModelResponse(
            SiteId, "C", FittedAt, 412.6, 1,
            new ModelSettingsUsed("auto", "burg", "pacf-aic", 24, 365, "calibrated"),
            new ModelWindow(new DateTimeOffset(2024, 3, 14, 3, 0, 0, TimeSpan.Zero), new DateTimeOffset(2025, 3, 14, 2, 0, 0, TimeSpan.Zero), 8760, 37, 2),
            new SeasonalityResponse("auto", "annual-diurnal", 2, 2, "gls",
                [
                    new TermResponse("level", 9.62, 0.41),
                    new TermResponse("annual-cos-1", -6.71, 0.52),
                    new TermResponse("annual-sin-1", -1.48, 0.52),
                    new TermResponse("annual-cos-2", 0.34, 0.37),
                    new TermResponse("annual-sin-2", 0.12, 0.37),
                    new TermResponse("diurnal-cos-1", -4.86, 0.09),
                    new TermResponse("diurnal-sin-1", -1.93, 0.09),
                    new TermResponse("diurnal-cos-2", 0.58, 0.06),
                    new TermResponse("diurnal-sin-2", 0.71, 0.06),
                ],
                "harmonics on squared anomalies"),
            new ArResponse("burg", 2, 0.003, [new CoefficientResponse(1, phi[0], 0.010), new CoefficientResponse(2, phi[1], 0.010)], 0.41,
                [.. roots.Select(r => new RootResponse(Math.Round(r.Re, 4), Math.Round(r.Im, 4), Math.Round(r.Modulus, 4)))], true),
            new OrderSelectionResponse("pacf-aic", 24, 0.0209, 2,
                [new LagValueResponse(1, 0.925), new LagValueResponse(2, -0.207), new LagValueResponse(3, 0.018)],
                [new CriteriaResponse(1, 15987.3, 15987.3, 16001.5), new CriteriaResponse(2, 15604.1, 15604.1, 15625.4), new CriteriaResponse(3, 15605.8, 15605.8, 15634.2)],
                2, "common rows t >= maxOrder of each segment (8712 points)"),
            [new LagValueResponse(1, 0.925), new LagValueResponse(2, 0.826), new LagValueResponse(3, 0.731)],
            new ResidualsResponse(new LjungBoxResponse(48, 61.2, 46, 0.066), new JarqueBeraResponse(212.4, 2, 0), 0.001, 0.64, -0.21, 3.62),
            new IntervalsResponse("calibrated", "empirical quantiles of 2880 standardised rolling-origin errors from 120 origins in 4 folds"),
            [],
            new LastFitAttempt(FittedAt, false, null));
    }

    private static VerificationResponse Verification()
    {
        IntervalScoresResponse[] intervals = [new(80, 0.79, 2.71, 3.52, 0.31), new(95, 0.94, 4.12, 5.08, 0.14)];
        ScoresResponse Scores(int? horizon, int count, double mae, double rmse, double skillVsPersistence) =>
            new(horizon, count, mae, rmse, 0.04, Math.Round(mae * 1.6, 2), Math.Round(mae * 2.3, 2), skillVsPersistence, 0.74, Math.Round(mae * 0.72, 2), intervals, []);
        return new VerificationResponse(SiteId, IssuedAt,
            new BacktestResponse(new DateTimeOffset(2024, 11, 14, 0, 0, 0, TimeSpan.Zero), Origin.AddHours(3), 120, 7,
                [Scores(1, 120, 0.42, 0.56, 0.12), Scores(24, 120, 1.31, 1.72, 0.58)], Scores(null, 2880, 1.02, 1.37, 0.47))
            {
                Thresholds = [new ThresholdScoresResponse("frost", 0, "below", "next24h", 120, 0.18, 0.081, 0.148, 0.45,
                    [new ReliabilityBinResponse(0, 0.1, 0.03, 0.02, 71), new ReliabilityBinResponse(0.9, 1, 0.94, 0.9, 10)], [])],
            },
            new LiveScoresResponse(2, Scores(null, 48, 1.08, 1.41, 0.44),
                [new LiveDayResponse(new DateOnly(2025, 3, 12), new DateTimeOffset(2025, 3, 11, 21, 7, 0, TimeSpan.Zero), 24, 0.97, -0.12),
                 new LiveDayResponse(new DateOnly(2025, 3, 13), new DateTimeOffset(2025, 3, 12, 21, 7, 0, TimeSpan.Zero), 24, 1.19, 0.21)]));
    }
}
