using System.Globalization;
using System.Text.Json;
using System.Text.Json.Serialization;
using ForecastHub.Api.Forecasts;
using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Climatology;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Risk;
using ForecastHub.Core.Selection;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Sites;
using ApiNextDay = ForecastHub.Api.Forecasts.NextDaySummary;
using ApiStep = ForecastHub.Api.Forecasts.ForecastStep;
using CoreSettings = ForecastHub.Core.Modeling.ModelSettings;

namespace ForecastHub.Api.Models;

/// <summary>A forecast from the core, mapped to the HTTP contract (levels in percent).</summary>
public sealed record ForecastPath(DateTimeOffset LastData, int MissingSteps, string IntervalMethod, IReadOnlyList<ApiStep> Steps, ApiNextDay? NextDay,
    IReadOnlyList<RiskResponse> Risk);

/// <summary>
/// The one place the service meets the modeling pipeline of ForecastHub.Core: settings from the
/// site's strings, fitting, the stored JSON form of a model, forecasting, and the mapping of a
/// model to the field names of the HTTP contract.
/// </summary>
public sealed class SiteModeling
{
    // The model carries NaN in places (an undefined statistic); named literals keep it round-trippable.
    private static readonly JsonSerializerOptions Json = new()
    {
        NumberHandling = JsonNumberHandling.AllowNamedFloatingPointLiterals,
    };

    public FittedSiteModel Fit(TimeGrid grid, SiteRecord site)
    {
        var model = SiteModelFitter.Fit(grid, Settings(site));
        return new FittedSiteModel(model, JsonSerializer.Serialize(model, Json), model.Diagnostics.LjungBox?.PValue, model.Window.To);
    }

    public SiteModel Read(string json) =>
        JsonSerializer.Deserialize<SiteModel>(json, Json) ?? throw new InvalidOperationException("A stored model is empty.");

    /// <summary>Forecasts <paramref name="steps"/> grid steps after the last step of <paramref name="recent"/>; levels in percent, thresholds in degrees C.</summary>
    /// <param name="risk">The site's thresholds and night; query thresholds are added after the site's, and windows start from <paramref name="now"/>.</param>
    public ForecastPath Forecast(SiteModel model, TimeGrid recent, int steps, IReadOnlyList<double> levels,
        IReadOnlyList<double> below, IReadOnlyList<double> above, int seed, SiteRiskSettings? risk = null, DateTimeOffset? now = null)
    {
        ArgumentNullException.ThrowIfNull(levels);
        ArgumentNullException.ThrowIfNull(below);
        ArgumentNullException.ThrowIfNull(above);
        var fractions = levels.Select(l => l / 100).ToArray();
        var thresholds = below.Select(v => new Threshold(v, ThresholdDirection.Below))
            .Concat(above.Select(v => new Threshold(v, ThresholdDirection.Above))).ToArray();
        var settings = risk ?? SiteRiskSettings.Default;
        var request = new RiskRequest(RiskThresholds(settings, below, above), Night(settings), now ?? recent.Times[^1]);
        var forecast = SiteForecaster.Forecast(model, recent, steps, fractions, thresholds, seed, risk: request);
        var path = forecast.Steps.Select(s => new ApiStep(s.Time, s.Mean, s.Sd, Intervals(s.Intervals),
            [.. s.Probabilities.Select(p => new StepProbabilityResponse(p.Id, p.Threshold, Wire(p.Direction), p.Probability))])).ToArray();
        var alertLevels = settings.Thresholds.ToDictionary(t => t.Id, t => t.AlertProbability, StringComparer.Ordinal);
        var risks = forecast.Risk.Select(r => new RiskResponse(
            r.Threshold.Id,
            r.Threshold.ValueC,
            Wire(r.Threshold.Direction),
            r.Threshold.Id is { } id ? alertLevels.GetValueOrDefault(id) : null,
            new RiskWindowResponse(r.Window.Name, r.Window.From, r.Window.To),
            r.Probability,
            r.FirstCrossing is { } c ? new CrossingResponse(c.Median, c.P10, c.P90) : null,
            r.ExpectedHoursBeyond,
            Summary(r.Extreme))).ToArray();
        var nextDay = forecast.NextDay is { } day
            ? new ApiNextDay(day.Date, Summary(day.Min), Summary(day.Max), Summary(day.Mean),
                [.. day.Probabilities.Select(p => new Forecasts.ThresholdProbability(p.Threshold, p.Direction == ThresholdDirection.Below ? "below" : "above", p.Probability))])
            : null;
        return new ForecastPath(forecast.LastData, forecast.MissingSteps, Wire(forecast.IntervalMethod), path, nextDay, risks);
    }

    /// <summary>The site's thresholds, then the query's that the site does not already have (same direction and value).</summary>
    public static IReadOnlyList<RiskThreshold> RiskThresholds(SiteRiskSettings settings, IReadOnlyList<double> below, IReadOnlyList<double> above)
    {
        ArgumentNullException.ThrowIfNull(settings);
        var list = settings.Thresholds
            .Select(t => new RiskThreshold(t.Id, t.Direction == "above" ? ThresholdDirection.Above : ThresholdDirection.Below, t.ValueC))
            .ToList();
        foreach (var t in below.Select(v => new RiskThreshold(null, ThresholdDirection.Below, v))
                     .Concat(above.Select(v => new RiskThreshold(null, ThresholdDirection.Above, v))))
        {
            if (!list.Any(s => s.Direction == t.Direction && s.ValueC == t.ValueC))
            {
                list.Add(t);
            }
        }

        return list;
    }

    public static NightHours Night(SiteRiskSettings settings)
    {
        ArgumentNullException.ThrowIfNull(settings);
        return new NightHours(TimeOnly.ParseExact(settings.NightStart, "HH:mm", CultureInfo.InvariantCulture),
            TimeOnly.ParseExact(settings.NightEnd, "HH:mm", CultureInfo.InvariantCulture));
    }

    /// <summary>The climatology (seasonal mean) of the model at each time.</summary>
    public double[] Climatology(SiteModel model, IReadOnlyList<DateTimeOffset> times)
    {
        ArgumentNullException.ThrowIfNull(model);
        return times.Count == 0 ? [] : model.Climatology.Mean(times);
    }

    public (int Order, string Method) Describe(SiteModel model)
    {
        ArgumentNullException.ThrowIfNull(model);
        return (model.Ar.Order, Wire(model.Ar.Method));
    }

    public ModelResponse Describe(SiteRecord site, ServingModel serving, FitAttempt? attempt)
    {
        ArgumentNullException.ThrowIfNull(site);
        ArgumentNullException.ThrowIfNull(serving);
        var m = serving.Model;
        var s = m.Settings;
        var selection = m.OrderSelection;
        var diagnostics = m.Diagnostics;
        return new ModelResponse(
            site.Id,
            serving.Stored.FittedAt,
            serving.Stored.FitDurationMs,
            serving.Stored.SettingsVersion,
            new ModelSettingsUsed(Wire(s.Seasonality), Wire(s.Method), Wire(s.OrderPolicy), s.MaxOrder, s.FitWindowDays, Wire(s.IntervalMethod)),
            new ModelWindow(m.Window.From, m.Window.To, m.Window.Points, m.Window.Interpolated, m.Window.Segments),
            new SeasonalityResponse(
                Wire(m.Climatology.Requested),
                Applied(m.Climatology.Design),
                m.Climatology.Design.AnnualHarmonics,
                m.Climatology.Design.DiurnalHarmonics,
                m.Climatology.Estimation,
                [.. m.Climatology.Terms.Select(t => new TermResponse(t.Name, t.Coefficient, t.StdError))],
                m.VarianceSeason.Coefficients.Count > 1 ? "harmonics on squared anomalies" : "constant"),
            new ArResponse(
                Wire(m.Ar.Method),
                m.Ar.Order,
                m.Ar.Mean,
                [.. m.Ar.Coefficients.Select((c, i) => new CoefficientResponse(i + 1, c, m.Ar.StandardErrors[i]))],
                m.Ar.InnovationVariance,
                [.. m.Ar.Roots.Select(r => new RootResponse(r.Re, r.Im, r.Modulus))],
                m.Ar.Stationary),
            new OrderSelectionResponse(
                Wire(selection.Policy),
                selection.MaxOrder,
                selection.Band,
                selection.PacfCutoff,
                [.. selection.Pacf.Select(p => new LagValueResponse(p.Lag, p.Value))],
                [.. selection.Criteria.Select(c => new CriteriaResponse(c.Order, c.Aic, c.Aicc, c.Bic))],
                selection.ChosenOrder,
                $"{Wire(selection.CriteriaSample)} ({selection.CriteriaSampleSize} points)"),
            [.. m.Acf.Select(a => new LagValueResponse(a.Lag, a.Value))],
            new ResidualsResponse(
                diagnostics.LjungBox is { } lb ? new LjungBoxResponse(lb.Lags, lb.Statistic, lb.Df, lb.PValue) : null,
                diagnostics.JarqueBera is { } jb ? new JarqueBeraResponse(jb.Statistic, jb.Df, jb.PValue) : null,
                diagnostics.Summary.Mean,
                diagnostics.Summary.Sd,
                diagnostics.Summary.Skewness,
                diagnostics.Summary.Kurtosis),
            new IntervalsResponse(
                m.Calibration is null ? "gaussian" : "calibrated",
                m.Calibration is { } c ? $"empirical quantiles of {c.Errors} standardised rolling-origin errors from {c.Origins} origins in {c.Folds} folds" : null),
            WindowNotes(serving, m.Notes),
            attempt is null ? null : new LastFitAttempt(attempt.AttemptedAt, attempt.Failed, attempt.Error));
    }

    // An archive's window ends long before the fit: say so beside the window's dates.
    private static IReadOnlyList<string> WindowNotes(ServingModel serving, IReadOnlyList<string> notes)
    {
        var age = serving.Stored.FittedAt - serving.Model.Window.To;
        return age < TimeSpan.FromDays(1)
            ? notes
            : [.. notes, string.Create(System.Globalization.CultureInfo.InvariantCulture,
                $"The fit window is counted back from the newest reading ({serving.Model.Window.To:yyyy-MM-dd HH:mm} UTC), {age.TotalDays:0} days before the fit: the model describes the site's archive, not its present.")];
    }

    /// <summary>The core's settings from the site's validated strings.</summary>
    public static CoreSettings Settings(SiteRecord site)
    {
        ArgumentNullException.ThrowIfNull(site);
        var m = site.Model;
        return new CoreSettings
        {
            Seasonality = m.Seasonality switch
            {
                "none" => Seasonality.None,
                "annual" => Seasonality.Annual,
                "annual-diurnal" => Seasonality.AnnualDiurnal,
                _ => Seasonality.Auto,
            },
            Method = m.Method switch
            {
                "yule-walker" => ArMethod.YuleWalker,
                "least-squares" => ArMethod.LeastSquares,
                "max-likelihood" => ArMethod.MaxLikelihood,
                _ => ArMethod.Burg,
            },
            OrderPolicy = m.OrderPolicy switch
            {
                "aic" => OrderPolicy.Aic,
                "aicc" => OrderPolicy.Aicc,
                "bic" => OrderPolicy.Bic,
                "pacf" => OrderPolicy.Pacf,
                _ => OrderPolicy.PacfAic,
            },
            MaxOrder = m.MaxOrder,
            FitWindowDays = m.FitWindowDays,
            IntervalMethod = m.IntervalMethod == "gaussian" ? IntervalMethod.Gaussian : IntervalMethod.Calibrated,
        };
    }

    private static ForecastInterval[] Intervals(IEnumerable<Core.Forecasting.PredictionInterval> intervals) =>
        [.. intervals.Select(i => new ForecastInterval(Math.Round(i.Level * 100, 6), i.Lower, i.Upper))];

    private static DaySummaryValue Summary(DistributionSummary summary) => new(summary.Mean, Intervals(summary.Intervals));

    // What the auto rule chose, read off the design the fit used.
    private static string Applied(HarmonicDesign design) => (design.AnnualHarmonics > 0, design.DiurnalHarmonics > 0) switch
    {
        (true, true) => "annual-diurnal",
        (true, false) => "annual",
        (false, true) => "diurnal",
        _ => "none",
    };

    private static string Wire(Seasonality value) => value switch
    {
        Seasonality.None => "none",
        Seasonality.Annual => "annual",
        Seasonality.AnnualDiurnal => "annual-diurnal",
        _ => "auto",
    };

    private static string Wire(ArMethod value) => value switch
    {
        ArMethod.YuleWalker => "yule-walker",
        ArMethod.LeastSquares => "least-squares",
        ArMethod.MaxLikelihood => "max-likelihood",
        _ => "burg",
    };

    private static string Wire(OrderPolicy value) => value switch
    {
        OrderPolicy.Aic => "aic",
        OrderPolicy.Aicc => "aicc",
        OrderPolicy.Bic => "bic",
        OrderPolicy.Pacf => "pacf",
        _ => "pacf-aic",
    };

    private static string Wire(ThresholdDirection value) => value == ThresholdDirection.Below ? "below" : "above";

    private static string Wire(IntervalMethod value) => value == IntervalMethod.Gaussian ? "gaussian" : "calibrated";

    private static string Wire(CriteriaSample value) => value switch
    {
        CriteriaSample.CommonRows => "common rows t >= maxOrder of each segment",
        CriteriaSample.ExactLikelihood => "exact likelihood of all points",
        _ => "all points",
    };
}
