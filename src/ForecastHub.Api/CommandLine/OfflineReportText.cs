using System.Globalization;
using System.Text;
using ForecastHub.Api.Verification;

namespace ForecastHub.Api.CommandLine;

/// <summary>The text form of an <see cref="OfflineReport"/>: what a person reads to see why this order was chosen and how good it is.</summary>
internal static class OfflineReportText
{
    private const int MaxRejectedShown = 20;
    private const int PacfLagsShown = 12;

    public static string Format(OfflineReport report, string jsonPath)
    {
        var text = new StringBuilder();
        void Line(FormattableString line) => text.AppendLine(line.ToString(CultureInfo.InvariantCulture));
        var input = report.Input!;
        var m = report.Model!;

        Line($"ForecastHub {report.Verb}: {input.File}");
        Line($"Input       {input.Rows} rows: {input.Accepted} readings used, {input.Rejected.Count} rejected, {input.Duplicates} duplicates, {input.Conflicts} conflicting; {input.Flagged} flagged by QC (left out of fitting)");
        foreach (var line in RejectedLines(input.Rejected))
        {
            text.AppendLine(line);
        }
        Line($"Cadence     {input.Cadence} ({input.CadenceChosenBy})");
        Line($"Time zone   {input.TimeZone} ({input.TimeZoneChosenBy})");
        Line($"Window      {m.Window.From:yyyy-MM-dd HH:mm zzz} to {m.Window.To:yyyy-MM-dd HH:mm zzz}: {m.Window.Points} points, {m.Window.Interpolated} interpolated, {m.Window.Segments} segment(s)");
        Line($"Climatology {m.Seasonality.Requested} -> {m.Seasonality.Applied}: {m.Seasonality.AnnualHarmonics} annual and {m.Seasonality.DiurnalHarmonics} diurnal harmonics, estimated by {m.Seasonality.Estimation}; innovation variance {m.Seasonality.VarianceModel}");
        text.AppendLine();

        var sel = m.OrderSelection;
        Line($"Order choice, policy {sel.Policy}, orders searched 0..{sel.MaxOrder}:");
        var outside = sel.Pacf.Where(p => Math.Abs(p.Value) > sel.Band).Select(p => p.Lag).ToList();
        Line($"  PACF band +-{sel.Band:0.0000} (95 %); lags outside it: {(outside.Count == 0 ? "none" : string.Join(", ", outside.Take(20)))}{(outside.Count > 20 ? ", ..." : "")}");
        Line($"  PACF proposes P = {sel.PacfCutoff} (the last lag outside the band)");
        Line($"  PACF   {string.Join("  ", sel.Pacf.Take(PacfLagsShown).Select(p => $"{p.Lag}:{p.Value:0.000}{(Math.Abs(p.Value) > sel.Band ? "*" : "")}"))}");
        Line($"  The criterion decides: chosen order p = {sel.ChosenOrder}; criteria sample: {sel.CriteriaSample}");
        Line($"  {"order",5} {"AIC",14} {"AICc",14} {"BIC",14}");
        foreach (var c in sel.Criteria)
        {
            Line($"  {c.Order,5} {c.Aic,14:0.00} {c.Aicc,14:0.00} {c.Bic,14:0.00}{(c.Order == sel.ChosenOrder ? "  <- chosen" : "")}");
        }
        text.AppendLine();

        var ar = m.Ar;
        Line($"AR({ar.Order}) by {ar.Method}: anomaly mean {ar.Mean:0.0000} C, innovation variance {ar.InnovationVariance:0.0000} C^2, stationary: {(ar.Stationary ? "yes" : "no")}");
        Line($"  {"lag",5} {"coefficient",12} {"std. error",11}");
        foreach (var c in ar.Coefficients)
        {
            Line($"  {c.Lag,5} {c.Value,12:0.00000} {c.StdError,11:0.00000}");
        }
        if (ar.Roots.Count > 0)
        {
            Line($"  smallest root modulus {ar.Roots.Min(r => r.Modulus):0.0000} (above 1: stationary)");
        }
        var res = m.Residuals;
        Line($"Residuals   mean {res.Mean:0.0000} C, sd {res.Sd:0.0000} C, skewness {res.Skewness:0.000}, kurtosis {res.Kurtosis:0.000}");
        Line($"  {(res.LjungBox is { } lb ? $"Ljung-Box Q = {lb.Statistic:0.00} on {lb.Lags} lags, df {lb.Df}, p = {lb.PValue:0.0000} ({(lb.PValue >= 0.05 ? "no autocorrelation left at 5 %" : "autocorrelation left at 5 %")})" : "Ljung-Box: too few residuals")}");
        Line($"  {(res.JarqueBera is { } jb ? $"Jarque-Bera = {jb.Statistic:0.00}, df {jb.Df}, p = {jb.PValue:0.0000} ({(jb.PValue >= 0.05 ? "normal at 5 %" : "not normal at 5 %: calibrated intervals matter")})" : "Jarque-Bera: too few residuals")}");
        Line($"Intervals   {m.Intervals.Method}{(m.Intervals.Detail is { } d ? $": {d}" : "")}");
        text.AppendLine();

        AppendBacktest(text, report.Backtest, report.Verb == "backtest");
        foreach (var note in m.Notes)
        {
            Line($"Note        {note}");
        }
        Line($"JSON report {jsonPath}");
        return text.ToString();
    }

    /// <summary>The first 20 rejected rows with their line and reason, then how many more.</summary>
    public static IEnumerable<string> RejectedLines(IReadOnlyList<Observations.RejectedReading> rejected)
    {
        foreach (var r in rejected.Take(MaxRejectedShown))
        {
            yield return string.Create(CultureInfo.InvariantCulture, $"            line {r.Line}: {r.Reason}");
        }
        if (rejected.Count > MaxRejectedShown)
        {
            yield return string.Create(CultureInfo.InvariantCulture, $"            ... and {rejected.Count - MaxRejectedShown} more rejected rows ({rejected.Count} in all, each in the JSON report)");
        }
    }

    private static void AppendBacktest(StringBuilder text, BacktestResponse? backtest, bool perHorizon)
    {
        void Line(FormattableString line) => text.AppendLine(line.ToString(CultureInfo.InvariantCulture));
        if (backtest is null)
        {
            Line($"Backtest    the history is too short for one forecast origin in the test span");
            text.AppendLine();
            return;
        }
        var p = backtest.Pooled;
        Line($"Backtest    {backtest.Origins} daily origins from {backtest.From:yyyy-MM-dd} to {backtest.To:yyyy-MM-dd}, refit every {backtest.RefitEveryDays} days, next-day forecasts");
        Line($"  MAE {p.Mae:0.000} C (persistence {p.PersistenceMae:0.000} C, climatology {p.ClimatologyMae:0.000} C), RMSE {p.Rmse:0.000} C, bias {p.Bias:+0.000;-0.000} C, CRPS {p.Crps:0.000} C");
        Line($"  skill (1 - MSE/MSE_ref): {p.SkillVsPersistence:0.000} against persistence, {p.SkillVsClimatology:0.000} against climatology");
        foreach (var i in p.Intervals)
        {
            Line($"  {i.Level:0} % interval: covers {100 * i.Coverage:0.0} % of outcomes, mean width {i.MeanWidth:0.00} C, interval score {i.IntervalScore:0.00}");
        }
        foreach (var t in backtest.Thresholds)
        {
            Line($"  {t.Direction} {t.Threshold:0.0} C in the next 24 hours: {t.Count} forecasts, happened {100 * t.BaseRate:0.0} %; Brier {t.Brier:0.0000} (same-month base rate {t.ClimatologyBrier:0.0000}), skill {t.BrierSkill:0.000}");
            Line($"    {"chance",11} {"n",6} {"forecast",9} {"observed",9}");
            foreach (var b in t.Reliability.Where(b => b.Count > 0))
            {
                Line($"    {100 * b.From,4:0}-{100 * b.To,3:0} % {b.Count,6} {100 * b.ForecastMean,8:0.0}% {100 * b.ObservedFrequency,8:0.0}%");
            }
        }
        if (perHorizon)
        {
            Line($"  {"step",5} {"n",6} {"MAE",7} {"pers.",7} {"clim.",7} {"skill p",8} {"skill c",8} {"cov80",6} {"cov95",6}");
            foreach (var h in backtest.Horizons)
            {
                double Cover(double level) => h.Intervals.FirstOrDefault(i => Math.Abs(i.Level - level) < 1e-9)?.Coverage ?? double.NaN;
                Line($"  {h.Horizon,5} {h.Count,6} {h.Mae,7:0.000} {h.PersistenceMae,7:0.000} {h.ClimatologyMae,7:0.000} {h.SkillVsPersistence,8:0.000} {h.SkillVsClimatology,8:0.000} {100 * Cover(80),6:0.0} {100 * Cover(95),6:0.0}");
            }
        }
        text.AppendLine();
    }
}
