using System.Collections.Concurrent;
using System.Diagnostics;
using ForecastHub.Api.Metrics;
using ForecastHub.Core.Health;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Sites;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Models;

/// <summary>What a refit did: a new model, not enough data, or a failure (the previous model keeps serving).</summary>
public sealed record RefitOutcome(ServingModel? Model, string? Error, bool NotEnoughData)
{
    public bool Succeeded => Model is not null && Error is null && !NotEnoughData;

    /// <summary>The site was deleted while the fit ran, so its result was thrown away.</summary>
    public bool Discarded => Error == ModelService.DeletedDuringFit;
}

/// <summary>
/// The serving models: fits a site (one fit per site at a time), stores the result, and hands out
/// the stored model, loading it from storage on first use (after a restart, or after a background
/// fit that was evicted). At most <see cref="RefitOptions.MaxLoadedModels"/> parsed models stay in
/// memory, so a fleet sweep does not keep every site's model. Every model here belongs to one
/// incarnation of a site (its internal key): a fit of a site deleted meanwhile is refused by the store
/// and dropped, and a model in memory serves only the site record with the same key.
/// </summary>
public sealed partial class ModelService(
    IModelStore store,
    IReadingSummaryStore readingSummaries,
    SiteGridLoader grids,
    SiteVersions versions,
    RefitQueue refits,
    ServiceMetrics metrics,
    IOptions<HealthOptions> healthOptions,
    IOptions<RefitOptions> refitOptions,
    TimeProvider clock,
    ILogger<ModelService> logger)
{
    private readonly ConcurrentDictionary<string, ServingModel> loaded = new(StringComparer.Ordinal);
    private readonly ConcurrentDictionary<string, SemaphoreSlim> siteLocks = new(StringComparer.Ordinal);
    private readonly ConcurrentDictionary<string, TaskCompletionSource<RefitOutcome>> waiters = new(StringComparer.Ordinal);

    // Sites whose stored model (this incarnation, this fit) is of a format this build does not read; each got one forced refit request.
    private readonly ConcurrentDictionary<string, UnreadableModel> unreadable = new(StringComparer.Ordinal);

    // Moved by every Forget: a model read from storage before a forget is served but not kept.
    private long generation;

    /// <summary>The outcome's error when the site a fit ran for no longer exists (deleted, perhaps created again): the fit is discarded.</summary>
    public const string DeletedDuringFit = "The site was deleted during the fit; its result was discarded.";

    /// <summary>Completes with the outcome of the next fit of the site that finishes (background or requested), so callers await work instead of polling.</summary>
    public Task<RefitOutcome> WhenNextFitAsync(string siteId) =>
        waiters.GetOrAdd(siteId, _ => new TaskCompletionSource<RefitOutcome>(TaskCreationOptions.RunContinuationsAsynchronously)).Task;

    private RefitOutcome Signal(string siteId, RefitOutcome outcome)
    {
        if (waiters.TryRemove(siteId, out var waiter))
        {
            waiter.TrySetResult(outcome);
        }

        return outcome;
    }

    /// <summary>The model serving this site, or null before its first fit.</summary>
    public async Task<ServingModel?> GetAsync(SiteRecord site, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(site);
        if (loaded.TryGetValue(site.Id, out var cached) && cached.Stored.SiteKey == site.Key)
        {
            return cached;
        }

        var seen = Interlocked.Read(ref generation);
        var stored = await store.GetAsync(site.Id, cancellationToken);
        if (stored is null || stored.SiteKey != site.Key)
        {
            // A model of another incarnation of the id (the record in hand is of a deleted site) serves nothing.
            return null;
        }

        var parsed = ModelJson.TryRead(stored.ModelJson, out var format);
        if (parsed is null)
        {
            var found = new UnreadableModel(stored.SiteKey, stored.FittedAt, format);
            if (!unreadable.TryGetValue(site.Id, out var known) || known != found)
            {
                unreadable[site.Id] = found;
                LogUnreadableModel(logger, site.Id, ModelJson.Format.Describe(format), ModelJson.Format.Version);
                refits.Enqueue(site.Id, force: true);
            }

            return null;
        }

        var model = ServingModel.From(stored, parsed);
        if (seen != Interlocked.Read(ref generation))
        {
            return model;
        }

        MakeRoom();
        return loaded.AddOrUpdate(site.Id, model, (_, held) => held.Stored.SiteKey == site.Key ? held : model);
    }

    /// <summary>The site's stored model (fitted at <paramref name="fittedAt"/>) when it is of a format this build does not read, so it serves nothing until the queued refit replaces it; null when it is readable.</summary>
    public async Task<UnreadableModel?> FindUnreadableAsync(SiteRecord site, DateTimeOffset fittedAt, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(site);
        if (loaded.TryGetValue(site.Id, out var held) && held.Stored.SiteKey == site.Key && held.Stored.FittedAt == fittedAt)
        {
            return null;
        }

        if (!unreadable.ContainsKey(site.Id))
        {
            await GetAsync(site, cancellationToken);
        }

        return unreadable.TryGetValue(site.Id, out var bad) && bad.SiteKey == site.Key && bad.FittedAt == fittedAt ? bad : null;
    }

    /// <summary>The unreadable stored model <see cref="GetAsync"/> last met for this site, if that is why it answered null.</summary>
    public UnreadableModel? KnownUnreadable(SiteRecord site) =>
        site is not null && unreadable.TryGetValue(site.Id, out var bad) && bad.SiteKey == site.Key ? bad : null;

    /// <summary>Grid points a site needs before its first fit.</summary>
    public int MinPoints(SiteRecord site) =>
        site.IsDaily ? healthOptions.Value.MinDailyPoints : healthOptions.Value.MinHourlyPoints;

    /// <summary>Looks at the site and refits it when a trigger applies, or always when <paramref name="force"/> is set.</summary>
    public async Task<(RefitReason? Reason, RefitOutcome? Outcome)> RefitIfDueAsync(SiteRecord site, bool force, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(site);
        var gate = siteLocks.GetOrAdd(site.Id, _ => new SemaphoreSlim(1, 1));
        await gate.WaitAsync(cancellationToken);
        try
        {
            // Whole milliseconds, as stored: the model kept in memory then has the stored model's time, so a later check
            // does not take it for one another node stored and drop it.
            var now = DateTimeOffset.FromUnixTimeMilliseconds(clock.GetUtcNow().ToUnixTimeMilliseconds());
            // Counted back from the newest reading, so a site holding only an old archive is fitted on it.
            var from = await grids.WindowStartAsync(site, site.Model.FitWindowDays, now, cancellationToken);

            // The decision reads the stored model's bookkeeping, not the copy in memory: another node may have fitted the site since.
            var current = await store.GetSummaryAsync(site.Id, cancellationToken);
            if (loaded.TryGetValue(site.Id, out var held) && held.Stored.FittedAt != current?.FittedAt)
            {
                loaded.TryRemove(new KeyValuePair<string, ServingModel>(site.Id, held));
            }

            if (current is not null && current.SettingsVersion > site.SettingsVersion)
            {
                // The site record in hand is older than the settings the stored model was fitted with.
                return (null, null);
            }

            var reason = force ? RefitReason.Requested : await DecideAsync(site, from, current, now, cancellationToken);
            if (reason is null)
            {
                return (null, null);
            }

            var grid = await grids.LoadFitWindowAsync(site, from, now, cancellationToken);
            if (grid is null)
            {
                return (null, null);
            }

            if (grid.ObservedCount < MinPoints(site))
            {
                return (reason, new RefitOutcome(await GetAsync(site, cancellationToken), $"The site has {grid.ObservedCount} of the {MinPoints(site)} grid points needed for a fit.", NotEnoughData: true));
            }

            return (reason, Signal(site.Id, await FitAsync(site, grid, reason.Value, now, cancellationToken)));
        }
        finally
        {
            gate.Release();
        }
    }

    /// <summary>The background refit decision. It needs counts and a last time only, answered from the reading index
    /// (the grid's observed steps and its newest one), so a site that is not due costs no read of its rows.</summary>
    private async Task<RefitReason?> DecideAsync(SiteRecord site, DateTimeOffset from, ModelSummary? current, DateTimeOffset now, CancellationToken cancellationToken)
    {
        var steps = await readingSummaries.StepsWithDataAsync(site, from, cancellationToken);
        var facts = new RefitFacts(
            site.IsDaily, steps.Count, MinPoints(site), site.SettingsVersion,
            current?.FittedAt, current?.SettingsVersion, current?.DataPoints, current?.DataEnd,
            steps.LastAt is { } last ? SiteGridLoader.AlignDown(site, last) : null, now);
        return RefitPolicy.Decide(facts, refitOptions.Value);
    }

    private async Task<RefitOutcome> FitAsync(SiteRecord site, Core.Grid.TimeGrid grid, RefitReason reason, DateTimeOffset now, CancellationToken cancellationToken)
    {
        var watch = Stopwatch.StartNew();
        FittedSiteModel fitted;
        try
        {
            fitted = FittedSiteModel.Fit(grid, site.Model, await CurrentModelAsync(site, cancellationToken), refitOptions.Value.CalibrationCarry);
        }
#pragma warning disable CA1031 // A fit may fail in any way on odd data; the failure is recorded and the old model keeps serving.
        catch (Exception error)
#pragma warning restore CA1031
        {
            watch.Stop();
            LogFitFailed(logger, error, site.Id, reason);
            metrics.Fits.Inc(1, "failed");
            var message = $"{error.GetType().Name}: {error.Message}";
            if (!await store.RecordFailureAsync(new FitAttempt(site.Id, site.Key, now, Failed: true, Error: message), cancellationToken))
            {
                return new RefitOutcome(null, DeletedDuringFit, NotEnoughData: false);
            }

            versions.ModelChanged(site.Id);
            return new RefitOutcome(await GetAsync(site, cancellationToken), message, NotEnoughData: false);
        }

        watch.Stop();
        var stored = new StoredModel(site.Id, site.Key, now, Math.Round(watch.Elapsed.TotalMilliseconds, 3), site.SettingsVersion,
            fitted.DataEnd, grid.ObservedCount, fitted.ResidualPValue, fitted.Json);
        if (!await store.SaveAsync(stored, cancellationToken))
        {
            LogFitDiscarded(logger, site.Id, reason);
            return new RefitOutcome(null, DeletedDuringFit, NotEnoughData: false);
        }

        var serving = ServingModel.From(stored, fitted.Model);
        unreadable.TryRemove(site.Id, out _);

        // Set (not added) under the site's lock, so a lazy load of the older stored model cannot win.
        MakeRoom();
        loaded[site.Id] = serving;
        versions.ModelChanged(site.Id);
        metrics.Fits.Inc(1, "ok");
        metrics.FitDuration.Observe(watch.Elapsed.TotalSeconds);
        LogFitted(logger, site.Id, reason, stored.FitDurationMs, grid.ObservedCount);
        return new RefitOutcome(serving, null, NotEnoughData: false);
    }

    /// <summary>The model a refit replaces, for its calibration table: the copy in memory (the refit decision dropped it if another
    /// fit has been stored since), else the stored one when readable. Unlike <see cref="GetAsync"/> it keeps and queues nothing.</summary>
    private async Task<Core.Modeling.SiteModel?> CurrentModelAsync(SiteRecord site, CancellationToken cancellationToken)
    {
        if (loaded.TryGetValue(site.Id, out var held) && held.Stored.SiteKey == site.Key)
        {
            return held.Model;
        }

        var stored = await store.GetAsync(site.Id, cancellationToken);
        return stored is not null && stored.SiteKey == site.Key ? ModelJson.TryRead(stored.ModelJson, out _) : null;
    }

    private void MakeRoom()
    {
        // Enumerating the dictionary itself takes no snapshot (Keys copies every key per call).
        foreach (var (victim, _) in loaded)
        {
            if (loaded.Count < refitOptions.Value.MaxLoadedModels)
            {
                break;
            }

            loaded.TryRemove(victim, out _);
        }
    }

    /// <summary>Parsed models held in memory now (at most <see cref="RefitOptions.MaxLoadedModels"/> after a load).</summary>
    public int LoadedCount => loaded.Count;

    /// <summary>Whether the site's model is held in memory (a read needs no storage).</summary>
    public bool IsLoaded(string siteId) => loaded.ContainsKey(siteId);

    /// <summary>Drops the in-memory copy of a site's model (deleted, or changed by another node), or of every model when <paramref name="siteId"/> is null.</summary>
    public void Forget(string? siteId)
    {
        Interlocked.Increment(ref generation);
        if (siteId is null)
        {
            loaded.Clear();
            unreadable.Clear();
        }
        else
        {
            loaded.TryRemove(siteId, out _);
            unreadable.TryRemove(siteId, out _);
        }
    }

    [LoggerMessage(Level = LogLevel.Warning, Message = "The stored model of site {SiteId} is of {Found}; this build reads format {Version}, so it serves nothing and a refit is queued")]
    private static partial void LogUnreadableModel(ILogger logger, string siteId, string found, int version);

    [LoggerMessage(Level = LogLevel.Information, Message = "Fit of site {SiteId} ({Reason}) discarded: the site was deleted while it ran")]
    private static partial void LogFitDiscarded(ILogger logger, string siteId, RefitReason reason);

    [LoggerMessage(Level = LogLevel.Warning, Message = "Fit of site {SiteId} ({Reason}) failed; the previous model keeps serving")]
    private static partial void LogFitFailed(ILogger logger, Exception error, string siteId, RefitReason reason);

    [LoggerMessage(Level = LogLevel.Information, Message = "Fitted site {SiteId} ({Reason}) in {DurationMs} ms on {Points} grid points")]
    private static partial void LogFitted(ILogger logger, string siteId, RefitReason reason, double durationMs, int points);
}

/// <summary>A stored model of a format this build does not read: the incarnation and fit it belongs to, and its format (null: the unversioned first one).</summary>
public sealed record UnreadableModel(long SiteKey, DateTimeOffset FittedAt, int? Format)
{
    public string Describe() => $"The stored model was written in {ModelJson.Format.Describe(Format)}, which this build (format {ModelJson.Format.Version}) does not read; it serves nothing and a refit is queued.";
}

/// <summary>A stored model's facts with its parsed form, ready to forecast; the JSON text is not kept (<c>Stored.ModelJson</c> is empty).</summary>
public sealed record ServingModel(StoredModel Stored, Core.Modeling.SiteModel Model)
{
    public static ServingModel From(StoredModel stored, Core.Modeling.SiteModel model)
    {
        ArgumentNullException.ThrowIfNull(stored);
        return new ServingModel(stored with { ModelJson = string.Empty }, model);
    }
}

