using ForecastHub.Api.Models;
using ForecastHub.Api.Verification;
using ForecastHub.Core.Health;
using ForecastHub.Core.Quality;
using ForecastHub.Core.Verification;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Verification;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Health;

/// <summary>Gathers what the health rules need for a site from storage and the clock, and applies them.</summary>
public sealed class ModelHealthService(
    ISiteStore sites,
    IModelStore models,
    ModelService serving,
    IReadingSummaryStore readingSummaries,
    IForecastArchive archive,
    IOptions<HealthOptions> options,
    IOptions<LiveScoreOptions> liveOptions,
    TimeProvider clock)
{

    public async Task<HealthAssessment?> EvaluateAsync(string siteId, CancellationToken cancellationToken)
    {
        var site = await sites.GetAsync(siteId, cancellationToken);
        return site is null ? null : await EvaluateAsync(site, cancellationToken);
    }

    public async Task<HealthAssessment> EvaluateAsync(SiteRecord site, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(site);
        var now = clock.GetUtcNow();
        var summary = await readingSummaries.GetAsync(site.Id, cancellationToken) ?? new ReadingSummary(null, 0, 0, 0);
        var model = await models.GetSummaryAsync(site.Id, cancellationToken);
        var attempt = await models.GetLastAttemptAsync(site.Id, cancellationToken);
        // A stored model this build cannot read serves nothing: judged as no model, with the reason said.
        var unreadable = model is null ? null : await serving.FindUnreadableAsync(site, model.FittedAt, cancellationToken);
        if (unreadable is not null)
        {
            model = null;
        }

        var isDaily = site.IsDaily;

        // Grid points matter only before the first fit (warming-up); they are counted in the index, not read.
        var gridPoints = 0;
        if (model is null)
        {
            // The fit window counts back from the newest reading (an archive is fitted on its last days).
            var anchor = summary.LastObservationAt is { } newest && newest < now ? newest : now;
            var from = anchor.AddDays(-site.Model.FitWindowDays);
            gridPoints = (await readingSummaries.StepsWithDataAsync(site, from, cancellationToken)).Count;
        }

        var live = await LiveWindowAsync(site.Id, now, cancellationToken);
        var inputs = new HealthInputs
        {
            Now = now,
            IsDaily = isDaily,
            GridPoints = gridPoints,
            LastObservationAt = summary.LastObservationAt,
            ModelFittedAt = model?.FittedAt,
            UnservableModel = unreadable?.Describe(),
            ModelDataEnd = model?.DataEnd,
            LastFitFailedAt = attempt is { Failed: true } ? attempt.AttemptedAt : null,
            LastFitError = attempt?.Error,
            ResidualPValue = model?.ResidualPValue,
            ScoredDays = live.Days,
            SkillVsPersistence = live.Skill,
            Coverage80 = live.Coverage(80),
            Coverage95 = live.Coverage(95),
            NewestReadingsFlatLine = ((QualityFlags)summary.LastFlags).HasFlag(QualityFlags.FlatLine),
            LastDayReadings = summary.LastDayReadings,
            LastDayFlagged = summary.LastDayFlagged,
        };
        return ModelHealth.Evaluate(inputs, options.Value);
    }

    private async Task<LiveWindow> LiveWindowAsync(string siteId, DateTimeOffset now, CancellationToken cancellationToken)
    {
        var from = DateOnly.FromDateTime(now.UtcDateTime).AddDays(-liveOptions.Value.WindowDays);
        var stored = await archive.ListScoresAsync(siteId, from, liveOptions.Value.WindowDays + 1, cancellationToken);
        var days = DayScore.ReadStored(stored).Where(d => d.Points.Count > 0).ToList();
        return new LiveWindow(days.Count, DayScore.Pool(days));
    }

    private sealed record LiveWindow(int Days, HorizonScores? Scores)
    {
        public double? Skill => Scores is { } s && double.IsFinite(s.SkillVsPersistence) ? s.SkillVsPersistence : null;

        public double? Coverage(int level) =>
            Scores?.Intervals.FirstOrDefault(i => Math.Abs(i.Level - (level / 100.0)) < 1e-9)?.Coverage;
    }
}
