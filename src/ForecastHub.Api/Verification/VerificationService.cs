using System.Collections.Concurrent;
using ForecastHub.Api.Models;
using ForecastHub.Core.Verification;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Verification;

namespace ForecastHub.Api.Verification;

/// <summary>
/// Verification of a site. The backtest is bounded (the last <see cref="HourlyBacktestDays"/> or
/// <see cref="DailyBacktestDays"/> of the grid) and cached per site and serving model, since it
/// refits several times; live scores are read from the archive on each request.
/// </summary>
public sealed class VerificationService(
    ModelService models,
    SiteGridLoader grids,
    IForecastArchive archive,
    TimeProvider clock)
{
    /// <summary>The hourly backtest covers up to a year of the fit window (so a frost season is in it), as far back as the data reach.</summary>
    public const int HourlyBacktestDays = 365;
    public const int DailyBacktestDays = 730;
    public const int RefitEveryDays = 7;

    /// <summary>Hourly refits at most every 7 days, and no more than <see cref="MaxHourlyRefits"/> in all: the
    /// interval widens with the span (31 days for a year), which bounds the cost to that many fits plus one forecast a day.</summary>
    public const int HourlyRefitEveryDays = 7;
    public const int MaxHourlyRefits = 12;
    public const int MaxLiveDays = 90;

    private readonly ConcurrentDictionary<string, (long SiteKey, DateTimeOffset FittedAt, string RiskKey, BacktestResponse? Backtest)> backtests = new(StringComparer.Ordinal);

    /// <summary>Null when the site has no model yet.</summary>
    public async Task<VerificationResponse?> GetAsync(SiteRecord site, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(site);
        var model = await models.GetAsync(site, cancellationToken);
        if (model is null)
        {
            return null;
        }

        var now = clock.GetUtcNow();
        BacktestResponse? backtest;
        if (backtests.TryGetValue(site.Id, out var cached) && cached.SiteKey == site.Key && cached.FittedAt == model.Stored.FittedAt && cached.RiskKey == site.Risk.Key)
        {
            backtest = cached.Backtest;
        }
        else
        {
            var maxDays = site.IsDaily ? DailyBacktestDays : Math.Min(HourlyBacktestDays, site.Model.FitWindowDays);
            var end = model.Stored.DataEnd;
            var readings = await grids.ReadAsync(site, end.AddDays(-(maxDays + site.Model.FitWindowDays)),
                SiteGridLoader.NextStep(site, SiteGridLoader.AlignDown(site, end)), cancellationToken);

            // Only the days the data reach back to are tested, so a young site keeps weekly refits.
            var days = readings is { Count: > 0 } ? Math.Clamp((int)Math.Ceiling((end - readings.Min(r => r.Time)).TotalDays), 1, maxDays) : maxDays;
            var refitEvery = site.IsDaily ? RefitEveryDays : Math.Max(HourlyRefitEveryDays, (int)Math.Ceiling(days / (double)MaxHourlyRefits));
            var thresholds = site.Risk.WithQueryThresholds([], []);
            backtest = readings is null ? null : BacktestResponse.Of(Backtest.Run(readings, site.GridOptions, site.Model, new BacktestOptions
            {
                DataEnd = end,
                Days = days,
                RefitEveryDays = refitEvery,
                Thresholds = thresholds,
                Night = site.Risk.Night,
            }), thresholds);
            SiteGridLoader.Release(readings);
            backtests[site.Id] = (site.Key, model.Stored.FittedAt, site.Risk.Key, backtest);
        }

        var from = DateOnly.FromDateTime(now.UtcDateTime).AddDays(-MaxLiveDays);
        var stored = await archive.ListScoresAsync(site.Id, from, MaxLiveDays, cancellationToken);
        var scoredDays = DayScore.ReadStored(stored);
        var scored = scoredDays.Where(d => d.Points.Count > 0).ToList();
        var pooled = DayScore.Pool(scored);
        var daily = scoredDays.Select(d =>
        {
            var one = DayScore.Pool([d]);
            return new LiveDayResponse(d.Date, d.IssuedAt, d.Points.Count, one?.Mae, one?.Bias);
        }).ToList();
        var live = new LiveScoresResponse(scored.Count, pooled is null ? null : ScoresResponse.From(pooled, null), daily)
        {
            Thresholds = [.. DayScore.PoolThresholds(scored).Select(t => ThresholdScoresResponse.From(t.Threshold, LiveScoresResponse.StepWindow, t.Scores))],
        };
        return new VerificationResponse(site.Id, now, backtest, live);
    }
}
