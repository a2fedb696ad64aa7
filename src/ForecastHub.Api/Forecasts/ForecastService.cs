using System.Collections.Concurrent;
using System.Diagnostics;
using System.Text.Json;
using ForecastHub.Api.Health;
using ForecastHub.Api.Metrics;
using ForecastHub.Api.Models;
using ForecastHub.Core.Health;
using ForecastHub.Core.Settings;
using ForecastHub.Storage.Sites;
using Microsoft.AspNetCore.Http.Json;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Forecasts;

/// <summary>Why no forecast could be made: the site has no model yet.</summary>
public sealed record ForecastUnavailable(string Detail);

/// <summary>
/// Forecasts from the serving model and the latest stored data. Answers are kept in memory per
/// site, keyed by the site's data and model versions, the current grid step and the query, so a
/// repeated request costs a dictionary look-up; new data or a new model starts a new key. The JSON
/// answer is kept serialised beside it (the bytes the host's JSON options make), so a hit writes
/// stored bytes instead of serialising about 10 KB again.
/// </summary>
public sealed class ForecastService(
    ModelService models,
    SiteGridLoader grids,
    SiteVersions versions,
    ModelHealthService health,
    ServiceMetrics metrics,
    IOptions<JsonOptions> json,
    TimeProvider clock)
{
    // Fixed so the same data, model and query give the same next-day summary.
    private const int MonteCarloSeed = 20_240_601;
    private const int MaxEntriesPerSite = 32;

    private readonly ConcurrentDictionary<string, SiteEntry> cache = new(StringComparer.Ordinal);

    public Task<(ForecastResponse? Forecast, ForecastUnavailable? Unavailable)> GetAsync(
        SiteRecord site, ForecastQuery query, CancellationToken cancellationToken) =>
        GetAsync(site, query, null, cancellationToken);

    /// <summary>As <see cref="GetAsync(SiteRecord, ForecastQuery, CancellationToken)"/>, with the site's health
    /// assessment of this moment when the caller has one, so a computed answer does not assess it again.</summary>
    public async Task<(ForecastResponse? Forecast, ForecastUnavailable? Unavailable)> GetAsync(
        SiteRecord site, ForecastQuery query, HealthAssessment? assessment, CancellationToken cancellationToken)
    {
        var (cached, unavailable) = await GetCachedAsync(site, query, assessment, cancellationToken);
        return (cached?.Response, unavailable);
    }

    /// <summary>The same answer as <see cref="GetAsync(SiteRecord, ForecastQuery, CancellationToken)"/>, as the UTF-8 JSON the endpoint writes.</summary>
    public async Task<(byte[]? Json, ForecastUnavailable? Unavailable)> GetJsonAsync(
        SiteRecord site, ForecastQuery query, CancellationToken cancellationToken)
    {
        var (cached, unavailable) = await GetCachedAsync(site, query, null, cancellationToken);
        return (cached?.Json(json.Value.SerializerOptions), unavailable);
    }

    private async Task<(CachedForecast? Forecast, ForecastUnavailable? Unavailable)> GetCachedAsync(
        SiteRecord site, ForecastQuery query, HealthAssessment? assessment, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(site);
        ArgumentNullException.ThrowIfNull(query);
        var watch = Stopwatch.StartNew();
        var now = clock.GetUtcNow();
        var (dataVersion, modelVersion) = versions.Get(site.Id);
        var step = SiteGridLoader.AlignDown(site, now);
        var entry = cache.AddOrUpdate(site.Id,
            _ => new SiteEntry(site.Key, dataVersion, modelVersion, step),
            (_, old) => old.Matches(site.Key, dataVersion, modelVersion, step) ? old : new SiteEntry(site.Key, dataVersion, modelVersion, step));
        // The site's thresholds and night are part of the key, so changing them re-evaluates the risk.
        var key = query.Key + "#" + site.Risk.Key;
        if (entry.Answers.TryGetValue(key, out var hit))
        {
            metrics.ForecastDuration.Observe(watch.Elapsed.TotalSeconds, "hit");
            return (hit, null);
        }

        var model = await models.GetAsync(site, cancellationToken);
        if (model is null)
        {
            assessment ??= await health.EvaluateAsync(site, cancellationToken);
            var why = string.Join(" ", assessment.Reasons.Select(r => r.Message));
            return (null, new ForecastUnavailable($"The site has no fitted model yet (health: {assessment.State}). {why}".Trim()));
        }

        var forecast = await ComputeAsync(site, model, query, now, assessment, cancellationToken);
        metrics.ForecastDuration.Observe(watch.Elapsed.TotalSeconds, "miss");
        if (forecast is null)
        {
            return (null, new ForecastUnavailable("The site has no stored data to forecast from."));
        }

        var computed = new CachedForecast(forecast);
        return (entry.Answers.Count < MaxEntriesPerSite ? entry.Answers.GetOrAdd(key, computed) : computed, null);
    }

    /// <summary>
    /// The grid a forecast issued at <paramref name="now"/> starts from: the recent data up to now, so
    /// steps with no data at its end are seen (the core forecasts from the last value, counts horizons
    /// from there and reports the missing steps). Null when the site has no data in that window.
    /// </summary>
    public async Task<Core.Grid.TimeGrid?> RecentGridAsync(SiteRecord site, DateTimeOffset now, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(site);
        var isDaily = site.IsDaily;
        var currentStep = SiteGridLoader.AlignDown(site, now);

        // Hourly: the hour in progress counts (the mean of its readings so far); daily: only whole local days.
        var to = isDaily ? currentStep : SiteGridLoader.NextStep(site, currentStep);
        var recentWindow = Core.Modeling.SiteForecaster.RecentWindow(site.Cadence);
        var from = now - recentWindow;
        var readings = await grids.ReadAsync(site, from, to, cancellationToken);
        if (readings is null)
        {
            return null;
        }

        // An archive that ended before the recent window: forecast from its last data, every missing step counted.
        if (readings.Count == 0 && await grids.NewestAsync(site, cancellationToken) is { } newest && newest < from)
        {
            SiteGridLoader.Release(readings);
            from = newest - recentWindow;
            readings = await grids.ReadAsync(site, from, to, cancellationToken) ?? [];
        }

        // The grid runs up to now, so steps with no data at its end are seen: the core forecasts from
        // the last value, counts horizons from there (wider intervals) and reports the missing steps.
        var grid = SiteGridLoader.Build(site, readings, from, to);
        SiteGridLoader.Release(readings);
        return grid.LastValueIndex < 0 ? null : grid;
    }

    private async Task<ForecastResponse?> ComputeAsync(SiteRecord site, ServingModel model, ForecastQuery query, DateTimeOffset now,
        HealthAssessment? assessment, CancellationToken cancellationToken)
    {
        var grid = await RecentGridAsync(site, now, cancellationToken);
        if (grid is null)
        {
            return null;
        }

        var isDaily = site.IsDaily;
        // Risk windows start from the current grid step, so the answer stays the same for the whole step it is cached for.
        var path = ForecastMapping.Forecast(model.Model, grid, query.Steps, query.Levels, query.Below, query.Above, MonteCarloSeed,
            site.Risk, SiteGridLoader.AlignDown(site, now));
        assessment ??= await health.EvaluateAsync(site, cancellationToken);
        var unit = isDaily ? "day" : "hour";
        var gap = path.MissingSteps == 0
            ? null
            : new ForecastDataGap(path.LastData, path.MissingSteps,
                $"The newest {path.MissingSteps} {unit}{(path.MissingSteps == 1 ? "" : "s")} before now have no data; the forecast starts from the data of {path.LastData:O} and its intervals are wider for it.");
        var reason = Confidence(assessment, path.LastData);
        return new ForecastResponse(
            site.Id,
            now,
            path.LastData,
            "C",
            assessment.State,
            new ForecastModelUsed(model.Model.Ar.Order, WireNames.Methods.Of(model.Model.Ar.Method), model.Stored.FittedAt, path.IntervalMethod),
            path.Steps,
            path.NextDay,
            path.Risk,
            reason is null ? "normal" : "reduced",
            reason,
            gap,
            ForecastCautions.All);
    }

    /// <summary>Reduced confidence when the site is stale, sensor-suspect or drifting (the most urgent state is the code).</summary>
    public static ConfidenceReason? Confidence(Core.Health.HealthAssessment assessment, DateTimeOffset lastData)
    {
        ArgumentNullException.ThrowIfNull(assessment);
        var state = assessment.State;
        if (state is not (Core.Health.HealthState.Stale or Core.Health.HealthState.SensorSuspect or Core.Health.HealthState.Drifting))
        {
            return null;
        }

        var why = string.Join(" ", assessment.Reasons.Where(r => r.State == state).Select(r => r.Message));
        var message = state switch
        {
            Core.Health.HealthState.SensorSuspect =>
                $"The sensor looks suspect: {why} Readings flagged by quality control are left out, so the forecast starts from the last data that passed, {lastData:O}, and its intervals are wider for the hours since.",
            Core.Health.HealthState.Stale => $"The data or the model is out of date: {why}",
            _ => $"The model no longer fits the site well: {why}",
        };
        return new ConfidenceReason(state, message);
    }

    // Keyed by the site's internal key too, so a site created again under the same id never meets the old site's answers.
    private sealed class SiteEntry(long siteKey, long dataVersion, long modelVersion, DateTimeOffset step)
    {
        public ConcurrentDictionary<string, CachedForecast> Answers { get; } = new(StringComparer.Ordinal);

        public bool Matches(long key, long data, long model, DateTimeOffset currentStep) =>
            key == siteKey && data == dataVersion && model == modelVersion && currentStep == step;
    }

    /// <summary>One computed answer; its JSON is made on first use and then reused.</summary>
    private sealed class CachedForecast(ForecastResponse response)
    {
        private byte[]? json;

        public ForecastResponse Response { get; } = response;

        // A race serialises twice and keeps either copy: both are the same bytes.
        public byte[] Json(JsonSerializerOptions options) => json ??= JsonSerializer.SerializeToUtf8Bytes(Response, options);
    }
}
