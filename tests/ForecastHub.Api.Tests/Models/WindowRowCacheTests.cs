using System.Collections.Concurrent;
using ForecastHub.Api.Models;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.TestSupport;
using ForecastHub.Core.Grid;
using ForecastHub.Storage;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.TestData;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Models;

/// <summary>
/// The fit window's rows held between refits (WindowRowCache), on the service's real SQLite file: kept the second time a
/// site's window is read from storage, then a refit after new readings reads only the newer rows and builds the very grid
/// a read of the whole window gives; a write at or before the rows held, a write overlapping the read, a deleted site and
/// the size limit each send the next read to storage.
/// </summary>
public sealed class WindowRowCacheTests
{
    private static readonly long WindowLongMs = (long)TimeSpan.FromDays(10).TotalMilliseconds;

    private sealed class Scenario : IAsyncDisposable
    {
        public ConcurrentQueue<(long FromMs, long ToMs)> Reads { get; } = new();

        public ApiFactory Factory { get; }

        public Scenario(string cacheMegabytes = "32")
        {
            var reads = Reads;
            Factory = new ApiFactory
            {
                // No background worker: the loads below are the only fit-window reads.
                Settings = new Dictionary<string, string?> { ["Refit:Enabled"] = "false", ["Refit:WindowCacheMegabytes"] = cacheMegabytes },
                // Under the service's decorators, so every write still reaches the cache as in production.
                TestServices = services => services.AddKeyedSingleton<IReadingStore>(StorageOptions.Sqlite, (sp, _) =>
                    new RecordingReadingStore(new SqliteReadingStore(sp.GetRequiredService<SqliteDatabase>()), reads)),
            };
        }

        public SiteGridLoader Grids => Factory.Services.GetRequiredService<SiteGridLoader>();

        public WindowRowCache Cache => Factory.Services.GetRequiredService<WindowRowCache>();

        public DateTimeOffset Now => Factory.Clock.GetUtcNow();

        public async Task<SiteRecord> SiteWithHistoryAsync(string id, int days)
        {
            using var client = Factory.CreateAdminClient();
            await client.CreateHourlySiteAsync(id);
            await Factory.IngestAsync(id, ModelScenario.History(Factory, days));
            return (await Factory.Services.GetRequiredService<ISiteStore>().GetAsync(id))!;
        }

        /// <summary>The fit window's grid through the cache, and the grid of one read of the whole window straight from storage.</summary>
        public async Task<(TimeGrid Cached, TimeGrid Stored, int LongReads)> LoadBothAsync(SiteRecord site, int windowDays = 30)
        {
            var from = Now.AddDays(-windowDays);
            Reads.Clear();
            var cached = (await Grids.LoadFitWindowAsync(site, from, Now, CancellationToken.None))!;
            var longReads = Reads.Count(r => r.ToMs - r.FromMs >= WindowLongMs);
            var stored = (await Grids.LoadAsync(site, from, Now, CancellationToken.None))!;
            return (cached, stored, longReads);
        }

        /// <summary>Loads the window twice: the first read from storage is not kept, the second is.</summary>
        public async Task HoldAsync(SiteRecord site, int windowDays = 30)
        {
            await LoadBothAsync(site, windowDays);
            await LoadBothAsync(site, windowDays);
        }

        public ValueTask DisposeAsync() => Factory.DisposeAsync();
    }

    private static void AssertSameGrid(TimeGrid expected, TimeGrid actual)
    {
        Assert.Equal(expected.Times, actual.Times);
        Assert.Equal(expected.Values, actual.Values);
        Assert.Equal(expected.ObservedCount, actual.ObservedCount);
        Assert.Equal(expected.Interpolated, actual.Interpolated);
    }

    [Fact]
    public async Task ALoadAfterNewReadingsReadsOnlyTheNewerRowsAndBuildsTheSameGridAsAWholeRead()
    {
        await using var scenario = new Scenario();
        var site = await scenario.SiteWithHistoryAsync("orchard", days: 20);
        var (first, stored, longReads) = await scenario.LoadBothAsync(site);
        AssertSameGrid(stored, first);
        Assert.Equal(1, longReads);
        // A sweep meets each site once: the first window read is not kept, the second is.
        Assert.Equal(0, scenario.Cache.Count);
        Assert.Equal(1, (await scenario.LoadBothAsync(site)).LongReads);
        Assert.Equal(1, scenario.Cache.Count);

        // A day later, a day of readings more: the window moved on and grew at its end.
        scenario.Factory.Clock.Advance(TimeSpan.FromDays(1));
        await scenario.Factory.IngestAsync("orchard", SyntheticSeries.HourlyUntil(scenario.Now, 24, seed: 7));
        var (second, storedNow, longReadsNow) = await scenario.LoadBothAsync(site);

        Assert.Equal(0, longReadsNow);
        AssertSameGrid(storedNow, second);
        Assert.Equal(first.ObservedCount + 24, second.ObservedCount);
        Assert.Equal(1, scenario.Cache.Count);
    }

    [Fact]
    public async Task AReplacedStoredReadingOrANeighbourNewlyFlaggedSendsTheNextLoadToStorage()
    {
        await using var scenario = new Scenario();
        var site = await scenario.SiteWithHistoryAsync("orchard", days: 20);
        await scenario.HoldAsync(site);
        var store = scenario.Factory.Services.GetRequiredService<IReadingStore>();
        var older = scenario.Now.AddDays(-3).ToUnixTimeMilliseconds() / 3_600_000 * 3_600_000;

        Assert.NotNull(await store.IngestAsync("orchard", [new IncomingReading(0, older, 31.5, 31.5, "C")], ConflictPolicy.Replace, scenario.Now));
        var (replaced, stored, longReads) = await scenario.LoadBothAsync(site);
        Assert.Equal(1, longReads);
        AssertSameGrid(stored, replaced);

        // A reading jumps away from the newest stored one; the next, back near it, makes the jump a spike: that write
        // reaches a row the cache holds, so it must not append to it.
        scenario.Factory.Clock.Advance(TimeSpan.FromHours(3));
        var all = (await store.ReadGridAsync("orchard", 0, long.MaxValue))!;
        var last = all[^1];
        var hour = last.Time.ToUnixTimeMilliseconds();
        await store.IngestAsync("orchard", [new IncomingReading(0, hour + 3_600_000, last.ValueC + 25, last.ValueC + 25, "C")], ConflictPolicy.Reject, scenario.Now);
        await scenario.LoadBothAsync(site);
        Assert.Equal(1, scenario.Cache.Count);
        var spike = await store.IngestAsync("orchard", [new IncomingReading(0, hour + 7_200_000, last.ValueC, last.ValueC, "C")], ConflictPolicy.Reject, scenario.Now);
        Assert.Equal(hour + 3_600_000, spike!.EarliestChangeMs);
        var (flagged, storedFlagged, longReadsFlagged) = await scenario.LoadBothAsync(site);
        Assert.Equal(1, longReadsFlagged);
        AssertSameGrid(storedFlagged, flagged);
    }

    [Fact]
    public async Task AWriteStartedDuringAReadKeepsNothingAndTheNextReadGoesToStorage()
    {
        await using var scenario = new Scenario();
        var site = await scenario.SiteWithHistoryAsync("orchard", days: 20);
        var raw = scenario.Factory.Services.GetRequiredKeyedService<IReadingStore>(StorageOptions.Sqlite);
        var cache = scenario.Cache;
        var from = scenario.Now.AddDays(-30).ToUnixTimeMilliseconds();
        var to = scenario.Now.ToUnixTimeMilliseconds();
        var calls = new List<(long FromMs, long ToMs)>();
        WindowRowCache.RowReader writing = (f, t, ct) =>
        {
            calls.Add((f, t));
            // A write of this site starts while the rows are read.
            cache.WriteStarting(site.Id);
            cache.WriteEnded(site.Id, earliestChangeMs: null, failed: false);
            return raw.ReadGridAsync(site.Id, f, t, ct);
        };
        WindowRowCache.RowReader plain = (f, t, ct) =>
        {
            calls.Add((f, t));
            return raw.ReadGridAsync(site.Id, f, t, ct);
        };

        // Read from storage once (not kept), then again with a write starting meanwhile: still nothing kept.
        Assert.NotNull(await cache.ReadAsync(site, from, to, plain, CancellationToken.None));
        Assert.NotNull(await cache.ReadAsync(site, from, to, writing, CancellationToken.None));
        Assert.Equal(0, cache.Count);

        // Held, then disturbed while its newer rows are read: the read starts again from storage, whole.
        Assert.NotNull(await cache.ReadAsync(site, from, to, plain, CancellationToken.None));
        Assert.NotNull(await cache.ReadAsync(site, from, to, plain, CancellationToken.None));
        Assert.Equal(1, cache.Count);
        calls.Clear();
        var rows = await cache.ReadAsync(site, from, to, writing, CancellationToken.None);
        Assert.Equal(2, calls.Count);
        Assert.True(calls[0].FromMs > from);
        Assert.Equal(from, calls[1].FromMs);
        Assert.Equal((await raw.ReadGridAsync(site.Id, from, to))!.ToArray(), rows!.ToArray());
        Assert.Equal(0, cache.Count);

        // A write in progress when the read starts: storage, and nothing kept.
        cache.WriteStarting(site.Id);
        Assert.NotNull(await cache.ReadAsync(site, from, to, plain, CancellationToken.None));
        Assert.Equal(0, cache.Count);
        cache.WriteEnded(site.Id, earliestChangeMs: null, failed: true);
    }

    [Fact]
    public async Task ADeletedSiteCreatedAgainIsReadFromStorageAndAForgottenOneToo()
    {
        await using var scenario = new Scenario();
        var site = await scenario.SiteWithHistoryAsync("orchard", days: 20);
        await scenario.HoldAsync(site);
        Assert.Equal(1, scenario.Cache.Count);

        using (var client = scenario.Factory.CreateAdminClient())
        {
            using var deleted = await client.DeleteAsync(new Uri("/api/v1/sites/orchard", UriKind.Relative));
            Assert.True(deleted.IsSuccessStatusCode);
        }

        Assert.Equal(0, scenario.Cache.Count);
        var renewed = await scenario.SiteWithHistoryAsync("orchard", days: 12);
        var (cached, stored, longReads) = await scenario.LoadBothAsync(renewed);
        Assert.Equal(1, longReads);
        AssertSameGrid(stored, cached);
        Assert.Equal(1, (await scenario.LoadBothAsync(renewed)).LongReads);
        Assert.Equal(1, scenario.Cache.Count);

        scenario.Cache.Forget(null);
        Assert.Equal(0, scenario.Cache.Count);
        Assert.Equal(1, (await scenario.LoadBothAsync(renewed)).LongReads);
    }

    [Fact]
    public async Task BeyondItsSizeTheLeastRecentlyUsedWindowGoesAndWithZeroNothingIsHeld()
    {
        await using (var scenario = new Scenario(cacheMegabytes: "1"))
        {
            // Two sites of 650 days hourly, each window more than half of the 1 MiB allowed.
            var a = await scenario.SiteWithHistoryAsync("a", days: 650);
            var b = await scenario.SiteWithHistoryAsync("b", days: 650);
            await scenario.HoldAsync(a, windowDays: 700);
            Assert.True(scenario.Cache.HeldBytes > 512 * 1024, $"{scenario.Cache.HeldBytes} bytes held");
            await scenario.HoldAsync(b, windowDays: 700);
            Assert.Equal(1, scenario.Cache.Count);

            Assert.Equal(0, (await scenario.LoadBothAsync(b, windowDays: 700)).LongReads);
            // a went for b: read from storage once more (remembered), then kept, and b goes.
            Assert.Equal(1, (await scenario.LoadBothAsync(a, windowDays: 700)).LongReads);
            Assert.Equal(1, (await scenario.LoadBothAsync(a, windowDays: 700)).LongReads);
            Assert.Equal(0, (await scenario.LoadBothAsync(a, windowDays: 700)).LongReads);
            Assert.Equal(1, (await scenario.LoadBothAsync(b, windowDays: 700)).LongReads);
        }

        await using var off = new Scenario(cacheMegabytes: "0");
        var site = await off.SiteWithHistoryAsync("a", days: 20);
        await off.HoldAsync(site);
        Assert.Equal(0, off.Cache.Count);
        Assert.Equal(1, (await off.LoadBothAsync(site)).LongReads);
    }
}
