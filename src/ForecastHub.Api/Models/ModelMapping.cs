using ForecastHub.Core.Climatology;
using ForecastHub.Core.Selection;
using ForecastHub.Core.Settings;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Models;

/// <summary>A fitted model mapped to the field names of <c>GET .../model</c> (DESIGN section 5), in degrees C.</summary>
public static class ModelMapping
{
    public static ModelResponse Describe(SiteRecord site, ServingModel serving, FitAttempt? attempt)
    {
        ArgumentNullException.ThrowIfNull(site);
        ArgumentNullException.ThrowIfNull(serving);
        var m = serving.Model;
        var s = m.Settings;
        var selection = m.OrderSelection;
        var diagnostics = m.Diagnostics;
        return new ModelResponse(
            site.Id,
            Observations.TemperatureUnits.Celsius,
            serving.Stored.FittedAt,
            serving.Stored.FitDurationMs,
            serving.Stored.SettingsVersion,
            new ModelSettingsUsed(WireNames.Seasonalities.Of(s.Seasonality), WireNames.Methods.Of(s.Method), WireNames.OrderPolicies.Of(s.OrderPolicy), s.MaxOrder, s.FitWindowDays, WireNames.IntervalMethods.Of(s.IntervalMethod)),
            new ModelWindow(m.Window.From, m.Window.To, m.Window.Points, m.Window.Interpolated, m.Window.Segments),
            new SeasonalityResponse(
                WireNames.Seasonalities.Of(m.Climatology.Requested),
                Applied(m.Climatology.Design),
                m.Climatology.Design.AnnualHarmonics,
                m.Climatology.Design.DiurnalHarmonics,
                m.Climatology.Estimation,
                [.. m.Climatology.Terms.Select(t => new TermResponse(t.Name, t.Coefficient, t.StdError))],
                m.VarianceSeason.Coefficients.Count > 1 ? "harmonics on squared anomalies" : "constant"),
            new ArResponse(
                WireNames.Methods.Of(m.Ar.Method),
                m.Ar.Order,
                m.Ar.Mean,
                [.. m.Ar.Coefficients.Select((c, i) => new CoefficientResponse(i + 1, c, m.Ar.StandardErrors[i]))],
                m.Ar.InnovationVariance,
                [.. m.Ar.Roots.Select(r => new RootResponse(r.Re, r.Im, r.Modulus))],
                m.Ar.Stationary),
            new OrderSelectionResponse(
                WireNames.OrderPolicies.Of(selection.Policy),
                selection.MaxOrder,
                selection.Band,
                selection.PacfCutoff,
                [.. selection.Pacf.Select(p => new LagValueResponse(p.Lag, p.Value))],
                [.. selection.Criteria.Select(c => new CriteriaResponse(c.Order, c.Aic, c.Aicc, c.Bic))],
                selection.ChosenOrder,
                $"{Describe(selection.CriteriaSample)} ({selection.CriteriaSampleSize} points)"),
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

    // What the auto rule chose, read off the design the fit used.
    private static string Applied(HarmonicDesign design) => (design.AnnualHarmonics > 0, design.DiurnalHarmonics > 0) switch
    {
        (true, true) => "annual-diurnal",
        (true, false) => "annual",
        (false, true) => "diurnal",
        _ => "none",
    };

    private static string Describe(CriteriaSample value) => value switch
    {
        CriteriaSample.CommonRows => "common rows t >= maxOrder of each segment",
        CriteriaSample.ExactLikelihood => "exact likelihood of all points",
        _ => "all points",
    };
}
