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
    /// <summary>The service's hourly backtest stays at 60 days (its cost is paid on a dashboard view); the CLI backtests a year.</summary>
    public const int HourlyBacktestDays = 60;
    public const int DailyBacktestDays = 730;
    public const int RefitEveryDays = 7;

    public const int HourlyRefitEveryDays = 7;
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
            var days = site.IsDaily ? DailyBacktestDays : HourlyBacktestDays;
            var end = model.Stored.DataEnd;
            var readings = await grids.ReadAsync(site, end.AddDays(-(days + site.Model.FitWindowDays)),
                SiteGridLoader.NextStep(site, SiteGridLoader.AlignDown(site, end)), cancellationToken);
            var refitEvery = site.IsDaily ? RefitEveryDays : HourlyRefitEveryDays;
            var thresholds = site.Risk.WithQueryThresholds([], []);
            backtest = readings is null ? null : BacktestResponse.Of(Backtest.Run(readings, site.GridOptions, site.Model, new BacktestOptions
            {
                DataEnd = end,
                Days = days,
                RefitEveryDays = refitEvery,
                Thresholds = thresholds,
                Night = site.Risk.Night,
            }), thresholds);
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
        var live = new LiveScoresResponse(scored.Count, pooled is null ? null : ScoresResponse.From(pooled, null), daily);
        return new VerificationResponse(site.Id, now, backtest, live);
    }
}
