using ForecastHub.Core.Quality;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Keys;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Verification;

namespace ForecastHub.Storage.Tests.Postgres;

/// <summary>The storage rules every backend keeps, run on SQLite and on PostgreSQL alike.</summary>
public sealed class BothBackendsTests
{
    private const long Day = 86_400_000;
    private const long Hour = 3_600_000;
    private static readonly DateTimeOffset Received = new(2025, 1, 1, 0, 0, 0, TimeSpan.Zero);

    private static IncomingReading[] DailyReadings(int firstDay, params double[] values) =>
        values.Select((v, i) => new IncomingReading(i, (firstDay + i) * Day, v, v, "C")).ToArray();

    // Hourly readings from hour `first`, indexed from 0 in the batch; value(i) of the hour i.
    internal static IncomingReading[] Hourly(int first, int count, Func<int, double> value) =>
        Enumerable.Range(first, count).Select(i => new IncomingReading(i - first, i * Hour, value(i), value(i), "C")).ToArray();

    internal static double Wave(int hour) => Math.Round(10 + (6 * Math.Sin(2 * Math.PI * hour / 24)) + (hour % 7 * 0.1), 2);

    private static async Task<Backend> WithSiteAsync(string backend)
    {
        var b = await Backend.CreateAsync(backend);
        Assert.True(await b.Sites.CreateAsync(SiteStoreTests.Site()));
        return b;
    }

    [Theory]
    [MemberData(nameof(Backend.Names), MemberType = typeof(Backend))]
    public async Task SitesReadBackEqualAndPageInByteOrder(string backend)
    {
        await using var b = await Backend.CreateAsync(backend);
        foreach (var id in new[] { "b", "a", "B", "a-1", "Z" })
        {
            Assert.True(await b.Sites.CreateAsync(SiteStoreTests.Site(id)));
        }

        Assert.False(await b.Sites.CreateAsync(SiteStoreTests.Site("a")));
        var stored = await b.Sites.GetAsync("a");
        Assert.True(stored!.Key > 0);
        Assert.Equal(SiteStoreTests.Site("a") with { Key = stored.Key }, stored);
        Assert.Equal(["B", "Z", "a"], (await b.Sites.ListAsync(null, 3)).Select(s => s.Id));
        Assert.Equal(["a-1", "b"], (await b.Sites.ListAsync("a", 3)).Select(s => s.Id));
        Assert.Null(await b.Sites.GetAsync("missing"));
    }

    [Theory]
    [MemberData(nameof(Backend.Names), MemberType = typeof(Backend))]
    public async Task SettingsChangesBumpTheVersionAndRenamesDoNot(string backend)
    {
        await using var b = await WithSiteAsync(backend);

        var same = await b.Sites.UpdateAsync("site-a", s => s);
        var renamed = await b.Sites.UpdateAsync("site-a", s => s with { Name = "Renamed" });
        var changed = await b.Sites.UpdateAsync("site-a", s => s with { Model = s.Model with { MaxOrder = 10 } });

        Assert.Equal(SiteStoreTests.Site() with { Key = same!.Key }, same);
        Assert.Equal(1, renamed!.SettingsVersion);
        Assert.Equal(2, changed!.SettingsVersion);
        var stored = await b.Sites.GetAsync("site-a");
        Assert.Equal(("Renamed", 10, 2L), (stored!.Name, stored.Model.MaxOrder, stored.SettingsVersion));
        Assert.Null(await b.Sites.UpdateAsync("missing", s => s));
    }

    [Theory]
    [MemberData(nameof(Backend.Names), MemberType = typeof(Backend))]
    public async Task ConcurrentSettingsChangesAreNeverLost(string backend)
    {
        await using var b = await WithSiteAsync(backend);

        await Task.WhenAll(Enumerable.Range(0, 8).Select(_ => Task.Run(() =>
            b.Sites.UpdateAsync("site-a", s => s with { Model = s.Model with { MaxOrder = s.Model.MaxOrder + 1 } }))));

        var site = await b.Sites.GetAsync("site-a");
        Assert.Equal(48 + 8, site!.Model.MaxOrder);
        Assert.Equal(1 + 8, site.SettingsVersion);
    }

    [Theory]
    [MemberData(nameof(Backend.Names), MemberType = typeof(Backend))]
    public async Task DeletingASiteDeletesItsReadingsModelAndArchive(string backend)
    {
        await using var b = await WithSiteAsync(backend);
        await b.Readings.IngestAsync("site-a", DailyReadings(0, 1, 2), ConflictPolicy.Reject, Received);
        var key = await KeyOfAsync(b, "site-a");
        Assert.True(await b.Models.SaveAsync(Model("site-a", key)));
        Assert.True(await b.Archive.ArchiveAsync(Archived("site-a", key, new DateOnly(2025, 1, 2))));

        Assert.True(await b.Sites.DeleteAsync("site-a"));
        Assert.True(await b.Sites.CreateAsync(SiteStoreTests.Site()));

        Assert.Empty((await b.Readings.ReadAsync("site-a", long.MinValue, long.MaxValue, null, 10))!);
        Assert.Null(await b.Models.GetAsync("site-a"));
        Assert.False(await b.Archive.HasArchivedAsync("site-a", new DateOnly(2025, 1, 2)));
        Assert.False(await b.Sites.DeleteAsync("missing"));
    }

    [Theory]
    [MemberData(nameof(Backend.Names), MemberType = typeof(Backend))]
    public async Task IngestOutcomesFlagsAndStoredRowsFollowThePlanner(string backend)
    {
        await using var b = await WithSiteAsync(backend);
        await b.Readings.IngestAsync("site-a", DailyReadings(0, 3, 3, 3, 10, 11), ConflictPolicy.Reject, Received);

        // Day 1 again (duplicate), day 3 changed (conflict), flat line continued, one out of range.
        var second = await b.Readings.IngestAsync("site-a",
            [new(0, 1 * Day, 3, 3, "C"), new(1, 3 * Day, 12, 12, "C"), new(2, 5 * Day, 11, 11, "C"), new(3, 6 * Day, 61, 61, "C")],
            ConflictPolicy.Reject, Received.AddHours(1));
        var third = await b.Readings.IngestAsync("site-a", [new(0, 3 * Day, 12, 53.6, "F")], ConflictPolicy.Replace, Received.AddHours(2));

        Assert.Equal([ReadingOutcomeKind.Duplicate, ReadingOutcomeKind.Conflict, ReadingOutcomeKind.Accepted, ReadingOutcomeKind.Accepted],
            second!.Outcomes.Select(o => o.Kind));
        Assert.Equal([3, 10.0, null, null], second.Outcomes.Select(o => o.StoredValueC));
        Assert.Equal(QualityFlags.OutOfRange, second.Outcomes[3].Flags & QualityFlags.OutOfRange);
        Assert.Equal(ReadingOutcomeKind.Replaced, third!.Outcomes.Single().Kind);
        var stored = await b.Readings.ReadAsync("site-a", long.MinValue, long.MaxValue, null, 100);
        Assert.Equal([3, 3, 3, 12, 11, 11, 61.0], stored!.Select(r => r.ValueC));
        Assert.Equal("F", stored![3].OriginalUnit);
        Assert.Equal(new ReadingSpan(0, 6 * Day, 7), await b.Readings.SpanAsync("site-a"));
        Assert.Null(await b.Readings.IngestAsync("missing", DailyReadings(0, 1), ConflictPolicy.Reject, Received));
        Assert.Null(await b.Readings.ReadAsync("missing", 0, long.MaxValue, null, 10));
        Assert.Null(await b.Readings.SpanAsync("missing"));
    }

    [Fact]
    public async Task BothBackendsGiveTheSameOutcomesAndRowsForMixedBatches()
    {
        await using var sqlite = await WithSiteAsync("sqlite");
        await using var postgres = await WithSiteAsync("postgres");
        // 3,000 hours with an out-of-range value, a spike, a flat line and a time sent twice in one batch;
        // then an overlapping batch (duplicates, conflicts, new rows), then replacements that end the flat line.
        var first = Hourly(0, 3_000, i => i switch { 100 => 75, 500 => 40, >= 1_000 and < 1_008 => 4.5, _ => Wave(i) })
            .Append(new IncomingReading(3_000, 2_999 * Hour, Wave(2_999), Wave(2_999), "C")).ToArray();
        var overlap = Hourly(2_500, 1_000, i => i % 10 == 0 ? Wave(i) + 1 : Wave(i));
        var replace = Hourly(1_003, 3, i => 9.75);
        Func<Backend, Task<IngestResult?>>[] steps =
        [
            b => b.Readings.IngestAsync("site-a", first, ConflictPolicy.Reject, Received),
            b => b.Readings.IngestAsync("site-a", overlap, ConflictPolicy.Reject, Received.AddHours(1)),
            b => b.Readings.IngestAsync("site-a", replace, ConflictPolicy.Replace, Received.AddHours(2)),
        ];

        var outcomes = new List<IReadOnlyList<ReadingOutcome>>();
        foreach (var step in steps)
        {
            var expected = (await step(sqlite))!.Outcomes;
            Assert.Equal(expected, (await step(postgres))!.Outcomes);
            outcomes.Add(expected);
        }

        var rows = await sqlite.Readings.ReadAsync("site-a", long.MinValue, long.MaxValue, null, 10_000);
        Assert.Equal(rows, await postgres.Readings.ReadAsync("site-a", long.MinValue, long.MaxValue, null, 10_000));
        // The script reaches every outcome and flag it means to, so the comparisons above cover them.
        Assert.Equal(ReadingOutcomeKind.Duplicate, outcomes[0][^1].Kind);
        Assert.Equal(50, outcomes[1].Count(o => o.Kind == ReadingOutcomeKind.Conflict));
        Assert.Equal(450, outcomes[1].Count(o => o.Kind == ReadingOutcomeKind.Duplicate));
        Assert.Equal(500, outcomes[1].Count(o => o.Kind == ReadingOutcomeKind.Accepted));
        Assert.All(outcomes[2], o => Assert.Equal(ReadingOutcomeKind.Replaced, o.Kind));
        Assert.Equal(3_500, rows!.Count);
        Assert.Contains(rows, r => r.Flags.HasFlag(QualityFlags.OutOfRange));
        Assert.Contains(rows, r => r.Flags.HasFlag(QualityFlags.Spike));
        Assert.Contains(rows, r => r.Flags.HasFlag(QualityFlags.FlatLine));
        Assert.Equal(9.75, rows[1_004].ValueC);
    }

    [Theory]
    [MemberData(nameof(Backend.Names), MemberType = typeof(Backend))]
    public async Task StoredValuesReadBackBitForBitInPages(string backend)
    {
        await using var b = await WithSiteAsync(backend);
        var random = new Random(5);
        var incoming = Enumerable.Range(0, 3_001).Select(i =>
        {
            var v = ((random.NextDouble() * 150) - 90) / 7;
            return new IncomingReading(i, i * 60_000L, v, (v * 9 / 5) + 32, "F");
        }).ToArray();

        var result = await b.Readings.IngestAsync("site-a", incoming, ConflictPolicy.Reject, Received);

        Assert.All(result!.Outcomes, o => Assert.Equal(ReadingOutcomeKind.Accepted, o.Kind));
        var first = await b.Readings.ReadAsync("site-a", long.MinValue, long.MaxValue, null, 2_000);
        var rest = await b.Readings.ReadAsync("site-a", long.MinValue, long.MaxValue, first![^1].TimeMs, 2_000);
        Assert.Equal(incoming.Select(r => (r.TimeMs, r.ValueC, r.OriginalValue, r.OriginalUnit)),
            first.Concat(rest!).Select(r => (r.TimeMs, r.ValueC, r.OriginalValue, r.OriginalUnit)));
    }

    [Theory]
    [MemberData(nameof(Backend.Names), MemberType = typeof(Backend))]
    public async Task ConcurrentIngestsOfOneSiteEachStoreEveryReadingOnce(string backend)
    {
        await using var b = await WithSiteAsync(backend);
        // Four writers send overlapping batches: every time ends up stored once, and each outcome is accepted or duplicate.
        var batches = Enumerable.Range(0, 4).Select(w => Enumerable.Range(0, 200)
            .Select(i => new IncomingReading(i, ((w * 100) + i) * 3_600_000L, 10 + ((w * 100 + i) % 7), 10 + ((w * 100 + i) % 7), "C")).ToArray()).ToArray();

        var results = await Task.WhenAll(batches.Select(batch => Task.Run(() => b.Readings.IngestAsync("site-a", batch, ConflictPolicy.Reject, Received))));

        Assert.Equal(500, results.Sum(r => r!.Outcomes.Count(o => o.Kind == ReadingOutcomeKind.Accepted)));
        Assert.Equal(300, results.Sum(r => r!.Outcomes.Count(o => o.Kind == ReadingOutcomeKind.Duplicate)));
        Assert.Equal(500, (await b.Readings.SpanAsync("site-a"))!.Value.Count);
    }

    [Theory]
    [MemberData(nameof(Backend.Names), MemberType = typeof(Backend))]
    public async Task ReadingSummaryCountsTheLastDayAndTheStepsWithData(string backend)
    {
        await using var b = await WithSiteAsync(backend);
        Assert.Equal(new ReadingSummary(null, 0, 0, 0), await b.Summaries.GetAsync("site-a"));
        var hourly = Enumerable.Range(0, 30).Select(i => new IncomingReading(i, i * 3_600_000L, i == 29 ? 70 : 10 + (i % 3), 10, "C")).ToArray();
        await b.Readings.IngestAsync("site-a", hourly, ConflictPolicy.Reject, Received);

        var summary = await b.Summaries.GetAsync("site-a");

        Assert.Equal(DateTimeOffset.FromUnixTimeMilliseconds(29 * 3_600_000L), summary!.LastObservationAt);
        Assert.Equal(24, summary.LastDayReadings);
        Assert.True(summary.LastDayFlagged >= 1);
        Assert.Equal(29, (await b.Summaries.CountStepsWithDataAsync("site-a", DateTimeOffset.UnixEpoch, 3_600_000, 0)).Count);
        Assert.Equal(2, (await b.Summaries.CountStepsWithDataAsync("site-a", DateTimeOffset.UnixEpoch, Day, 0)).Count);
        Assert.Null(await b.Summaries.GetAsync("missing"));
    }

    [Theory]
    [MemberData(nameof(Backend.Names), MemberType = typeof(Backend))]
    public async Task KeysAreFoundByDigestListedAndRevokedOnce(string backend)
    {
        await using var b = await Backend.CreateAsync(backend);
        var admin = new ApiKeyRecord("k-admin", [1, 2, 3], "admin", [], "ops", Received, null);
        var ingest = new ApiKeyRecord("k-ingest", [4, 5, 6], "ingest", ["site-a", "site-b"], null, Received, null);

        Assert.True(await b.Keys.CreateAsync(admin));
        Assert.True(await b.Keys.CreateAsync(ingest));
        Assert.False(await b.Keys.CreateAsync(ingest with { Id = "k-other" }));
        var found = await b.Keys.FindBySecretAsync([4, 5, 6]);
        Assert.Equal(["site-a", "site-b"], found!.SiteIds);
        Assert.Equal(ingest.SecretSha256, found.SecretSha256);
        Assert.Null(found.Label);
        Assert.Equal(["k-admin", "k-ingest"], (await b.Keys.ListAsync(null, 10)).Select(k => k.Id));
        Assert.True(await b.Keys.HasActiveAdminAsync());
        Assert.False(await b.Keys.HasActiveAdminAsync("k-admin"));

        var revoked = await b.Keys.RevokeAsync("k-admin", Received.AddDays(1));
        var again = await b.Keys.RevokeAsync("k-admin", Received.AddDays(2));

        Assert.Equal(Received.AddDays(1), revoked!.Key.RevokedAt);
        Assert.True(revoked.Revoked);
        Assert.Equal(Received.AddDays(1), again!.Key.RevokedAt);
        Assert.False(again.Revoked);
        Assert.False(await b.Keys.HasActiveAdminAsync());
        Assert.Null(await b.Keys.RevokeAsync("missing", Received));
        Assert.Equal("ops", (await b.Keys.GetAsync("k-admin"))!.Label);
    }

    [Theory]
    [MemberData(nameof(Backend.Names), MemberType = typeof(Backend))]
    public async Task ModelsAndFitAttemptsAreKeptOnePerSite(string backend)
    {
        await using var b = await WithSiteAsync(backend);
        var key = await KeyOfAsync(b, "site-a");
        Assert.Null(await b.Models.GetAsync("site-a"));

        Assert.True(await b.Models.SaveAsync(Model("site-a", key)));
        Assert.True(await b.Models.RecordFailureAsync(new FitAttempt("site-a", key, Received.AddHours(1), true, "boom")));
        Assert.False(await b.Models.SaveAsync(Model("missing", key)));
        Assert.False(await b.Models.RecordFailureAsync(new FitAttempt("missing", key, Received, true, "x")));

        Assert.Equal(Model("site-a", key), await b.Models.GetAsync("site-a"));
        Assert.Equal(new FitAttempt("site-a", key, Received.AddHours(1), true, "boom"), await b.Models.GetLastAttemptAsync("site-a"));
        var summary = new ModelSummary("site-a", Received, 3, Received.AddDays(-1), 900, null);
        Assert.Equal(summary, await b.Models.GetSummaryAsync("site-a"));
        Assert.Equal([summary], await b.Models.ListSummariesAsync());
    }

    [Theory]
    [MemberData(nameof(Backend.Names), MemberType = typeof(Backend))]
    public async Task TheFirstArchivedForecastStaysAndScoresReplace(string backend)
    {
        await using var b = await WithSiteAsync(backend);
        var key = await KeyOfAsync(b, "site-a");
        var day = new DateOnly(2025, 3, 4);

        Assert.True(await b.Archive.ArchiveAsync(Archived("site-a", key, day)));
        Assert.False(await b.Archive.ArchiveAsync(Archived("site-a", key, day) with { ForecastJson = "{\"second\":true}" }));
        Assert.True(await b.Archive.ArchiveAsync(Archived("site-a", key, day.AddDays(1))));
        Assert.False(await b.Archive.ArchiveAsync(Archived("missing", key, day)));
        Assert.Equal([day, day.AddDays(1)], (await b.Archive.ListUnscoredAsync("site-a", 10)).Select(f => f.TargetDate));
        Assert.Equal(Archived("site-a", key, day), (await b.Archive.ListUnscoredAsync("site-a", 1)).Single());

        Assert.True(await b.Archive.SaveScoreAsync(new LiveScore("site-a", key, day, Received, "{\"a\":1}")));
        Assert.True(await b.Archive.SaveScoreAsync(new LiveScore("site-a", key, day, Received.AddHours(1), "{\"a\":2}")));

        Assert.Equal([day.AddDays(1)], (await b.Archive.ListUnscoredAsync("site-a", 10)).Select(f => f.TargetDate));
        Assert.Equal([new LiveScore("site-a", key, day, Received.AddHours(1), "{\"a\":2}")], await b.Archive.ListScoresAsync("site-a", day, 10));
        Assert.Empty(await b.Archive.ListScoresAsync("site-a", day.AddDays(1), 10));
        Assert.True(await b.Archive.HasArchivedAsync("site-a", day));
    }

    [Theory]
    [MemberData(nameof(Backend.Names), MemberType = typeof(Backend))]
    public async Task ALeaseIsHeldByOneHolderUntilReleasedOrExpired(string backend)
    {
        await using var b = await Backend.CreateAsync(backend);

        Assert.True(await b.Leases.TryTakeAsync("refit", "site-a", "node-1", TimeSpan.FromMinutes(1)));
        Assert.False(await b.Leases.TryTakeAsync("refit", "site-a", "node-2", TimeSpan.FromMinutes(1)));
        Assert.True(await b.Leases.TryTakeAsync("refit", "site-b", "node-2", TimeSpan.FromMinutes(1)));
        Assert.True(await b.Leases.TryTakeAsync("refit", "site-a", "node-1", TimeSpan.FromMinutes(1)));
        await b.Leases.ReleaseAsync("refit", "site-a", "node-2");
        Assert.False(await b.Leases.TryTakeAsync("refit", "site-a", "node-2", TimeSpan.FromMinutes(1)));
        await b.Leases.ReleaseAsync("refit", "site-a", "node-1");
        Assert.True(await b.Leases.TryTakeAsync("refit", "site-a", "node-2", TimeSpan.Zero));

        // A lease that ran out is free for anyone.
        Assert.True(await b.Leases.TryTakeAsync("refit", "site-a", "node-3", TimeSpan.FromMinutes(1)));
    }

    [Theory]
    [MemberData(nameof(Backend.Names), MemberType = typeof(Backend))]
    public async Task OfManyRacingHoldersExactlyOneGetsTheLease(string backend)
    {
        await using var b = await Backend.CreateAsync(backend);

        var taken = await Task.WhenAll(Enumerable.Range(0, 12).Select(i => Task.Run(() =>
            b.Leases.TryTakeAsync("refit", "site-a", $"node-{i}", TimeSpan.FromMinutes(1)))));

        Assert.Single(taken, t => t);
    }

    [Theory]
    [MemberData(nameof(Backend.Names), MemberType = typeof(Backend))]
    public async Task SiteKeysAreNeverGivenTwice(string backend)
    {
        await using var b = await Backend.CreateAsync(backend);
        Assert.True(await b.Sites.CreateAsync(SiteStoreTests.Site("a")));
        Assert.True(await b.Sites.CreateAsync(SiteStoreTests.Site("b")));
        var (a1, b1) = (await KeyOfAsync(b, "a"), await KeyOfAsync(b, "b"));

        // The newest site (the highest key) deleted and created again: a plain rowid would hand out its key again.
        Assert.True(await b.Sites.DeleteAsync("b"));
        Assert.True(await b.Sites.CreateAsync(SiteStoreTests.Site("b")));
        var b2 = await KeyOfAsync(b, "b");
        Assert.True(await b.Sites.DeleteAsync("a"));
        Assert.True(await b.Sites.DeleteAsync("b"));
        Assert.True(await b.Sites.CreateAsync(SiteStoreTests.Site("a")));
        var a2 = await KeyOfAsync(b, "a");

        Assert.True(a1 > 0 && b1 > a1, $"keys {a1}, {b1}");
        Assert.True(b2 > b1, $"b was {b1}, then {b2}");
        Assert.True(a2 > b2, $"a was {a1}, then {a2} after {b2}");
        Assert.Equal(a2, (await b.Sites.ListAsync(null, 10)).Single().Key);
    }

    [Theory]
    [MemberData(nameof(Backend.Names), MemberType = typeof(Backend))]
    public async Task WritesForADeletedSiteAreRefusedAlsoAfterItIsCreatedAgain(string backend)
    {
        await using var b = await WithSiteAsync(backend);
        var old = await KeyOfAsync(b, "site-a");
        var day = new DateOnly(2025, 3, 4);
        Assert.True(await b.Sites.DeleteAsync("site-a"));

        // Deleted: work that started for it (a fit, the archive step) stores nothing.
        Assert.False(await b.Models.SaveAsync(Model("site-a", old)));
        Assert.False(await b.Archive.ArchiveAsync(Archived("site-a", old, day)));

        // Created again under the same id: still refused, the new site has another key.
        Assert.True(await b.Sites.CreateAsync(SiteStoreTests.Site()));
        var renewed = await KeyOfAsync(b, "site-a");
        Assert.NotEqual(old, renewed);
        Assert.False(await b.Models.SaveAsync(Model("site-a", old)));
        Assert.False(await b.Models.RecordFailureAsync(new FitAttempt("site-a", old, Received, true, "boom")));
        Assert.False(await b.Archive.ArchiveAsync(Archived("site-a", old, day)));
        Assert.False(await b.Archive.SaveScoreAsync(new LiveScore("site-a", old, day, Received, "{}")));
        Assert.Null(await b.Models.GetAsync("site-a"));
        Assert.Null(await b.Models.GetSummaryAsync("site-a"));
        Assert.Null(await b.Models.GetLastAttemptAsync("site-a"));
        Assert.Empty(await b.Models.ListSummariesAsync());
        Assert.False(await b.Archive.HasArchivedAsync("site-a", day));
        Assert.Empty(await b.Archive.ListScoresAsync("site-a", day, 10));

        // The new site's own writes go through.
        Assert.True(await b.Models.SaveAsync(Model("site-a", renewed)));
        Assert.Equal(renewed, (await b.Models.GetAsync("site-a"))!.SiteKey);
    }

    private static async Task<long> KeyOfAsync(Backend b, string siteId) => (await b.Sites.GetAsync(siteId))!.Key;

    private static StoredModel Model(string siteId, long siteKey) =>
        new(siteId, siteKey, Received, 12.5, 3, Received.AddDays(-1), 900, null, "{\"model\":1}");

    private static ArchivedForecast Archived(string siteId, long siteKey, DateOnly day) =>
        new(siteId, siteKey, day, Received, Received.AddHours(-1), Received.AddDays(-2), "{\"forecast\":1}");
}
