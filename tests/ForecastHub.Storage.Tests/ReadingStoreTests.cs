using ForecastHub.Core.Quality;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Storage.Tests;

public sealed class ReadingStoreTests
{
    private const long Day = 86_400_000;
    private static readonly DateTimeOffset Received = new(2025, 1, 1, 0, 0, 0, TimeSpan.Zero);

    private static async Task<(TestDatabase Db, SqliteReadingStore Store)> WithSite()
    {
        var db = await SiteStoreTests.Migrated();
        await new SqliteSiteStore(db.Database, TimeProvider.System).CreateAsync(SiteStoreTests.Site());
        return (db, new SqliteReadingStore(db.Database));
    }

    private static IncomingReading[] DailyReadings(int firstDay, params double[] values) =>
        values.Select((v, i) => new IncomingReading(i, (firstDay + i) * Day, v, v, "C")).ToArray();

    [Fact]
    public async Task AFlatLineIsFoundAcrossBatchesEvenWhenTheStoredPartIsDaysOld()
    {
        var (db, store) = await WithSite();
        using var _ = db;
        await store.IngestAsync("site-a", DailyReadings(0, 3, 3, 3), ConflictPolicy.Reject, Received);

        var result = await store.IngestAsync("site-a", DailyReadings(3, 3, 3, 3), ConflictPolicy.Reject, Received);

        Assert.All(result!.Outcomes, o => Assert.Equal(QualityFlags.FlatLine, o.Flags));
        var stored = await store.ReadAsync("site-a", long.MinValue, long.MaxValue, null, 100);
        Assert.All(stored!, r => Assert.Equal(QualityFlags.FlatLine, r.Flags));
    }

    [Fact]
    public async Task ReadsPageAfterTheCursorWithinTheHalfOpenRange()
    {
        var (db, store) = await WithSite();
        using var _ = db;
        await store.IngestAsync("site-a", DailyReadings(0, 1, 2, 3, 4, 5, 6), ConflictPolicy.Reject, Received);

        var page = await store.ReadAsync("site-a", 1 * Day, 5 * Day, 2 * Day, 10);

        Assert.Equal([4.0, 5], page!.Select(r => r.ValueC));
        Assert.Equal(new ReadingSpan(0, 5 * Day, 6), await store.SpanAsync("site-a"));
    }

    [Fact]
    public async Task IngestToAMissingSiteStoresNothing()
    {
        var (db, store) = await WithSite();
        using var _ = db;

        Assert.Null(await store.IngestAsync("site-b", DailyReadings(0, 1), ConflictPolicy.Reject, Received));
        Assert.Equal(0, db.Scalar<int>("SELECT count(*) FROM readings;"));
    }

    [Fact]
    public async Task StoredValuesReadBackBitForBit()
    {
        var (db, store) = await WithSite();
        using var _ = db;
        var random = new Random(3);
        // Not a multiple of the rows per INSERT statement, so the last, shorter statement is covered too.
        var values = Enumerable.Range(0, 5_037)
            .Select(i => i % 2 == 0 ? Math.Round((random.NextDouble() * 150) - 90, 2) : ((random.NextDouble() * 150) - 90) / 7)
            .ToArray();
        var incoming = values.Select((v, i) => i % 3 == 0
            ? new IncomingReading(i, i * 60_000L, v, v + 273.15, "K")
            : new IncomingReading(i, i * 60_000L, v, (v * 9 / 5) + 32, "F")).ToArray();

        await store.IngestAsync("site-a", incoming, ConflictPolicy.Reject, Received);

        var stored = await store.ReadAsync("site-a", long.MinValue, long.MaxValue, null, 10_000);
        Assert.Equal(incoming.Select(r => (r.TimeMs, r.ValueC, r.OriginalValue, r.OriginalUnit)),
            stored!.Select(r => (r.TimeMs, r.ValueC, r.OriginalValue, r.OriginalUnit)));
    }

    [Theory]
    [InlineData(1)]
    [InlineData(99)]
    [InlineData(100)]
    [InlineData(101)]
    [InlineData(250)]
    public async Task EveryNewReadingIsStoredWithItsFlagsAndReceiptTimeWhateverTheBatchSize(int count)
    {
        var (db, store) = await WithSite();
        using var _ = db;
        // One reading above the site's limit (60 C), so one stored row carries a flag.
        var values = Enumerable.Range(0, count).Select(i => i == count / 2 ? 61.0 : 10.0 + (i % 5)).ToArray();

        await store.IngestAsync("site-a", DailyReadings(0, values), ConflictPolicy.Reject, Received);

        Assert.Equal(count, db.Scalar<int>("SELECT count(*) FROM readings;"));
        Assert.Equal(count, db.Scalar<int>($"SELECT count(*) FROM readings WHERE received_at_ms = {Received.ToUnixTimeMilliseconds()};"));
        var stored = await store.ReadAsync("site-a", long.MinValue, long.MaxValue, null, 1_000);
        Assert.Equal(values, stored!.Select(r => r.ValueC));
        Assert.Equal([count / 2], stored!.Select((r, i) => (r, i)).Where(x => x.r.Flags == QualityFlags.OutOfRange).Select(x => x.i));
    }

    [Fact]
    public async Task GridRowsReadThroughTheNativeCallsEqualThoseReadThroughSafeHandles()
    {
        var (db, store) = await WithSite();
        using var _ = db;
        // A reading a minute over 2,000 minutes: more rows than the 1,024 the array starts with for 34 hours, so it
        // grows; one reading above the site's limit (60 C) is flagged, so the flag column is read too.
        const long Minute = 60_000;
        var values = Enumerable.Range(0, 2000).Select(i => i == 1234 ? 61.0 : Math.Sin(i / 9.0) * 7 + 0.1 / 3).ToArray();
        var readings = values.Select((v, i) => new IncomingReading(i, i * Minute, v, v, "C")).ToArray();
        await store.IngestAsync("site-a", readings, ConflictPolicy.Reject, Received);
        var key = db.Scalar<long>("SELECT key FROM sites WHERE id = 'site-a';");
        Assert.True(SqliteRowCalls.Available);

        using var connection = db.Database.Open();
        var native = SqliteReadingStore.ReadGridRows(connection, key, 0, 2000 * Minute, nativeCalls: true);
        var safe = SqliteReadingStore.ReadGridRows(connection, key, 0, 2000 * Minute, nativeCalls: false);

        Assert.Equal(values, native.Select(r => r.ValueC));
        Assert.Equal(Enumerable.Range(0, 2000).Select(i => DateTimeOffset.FromUnixTimeMilliseconds(i * Minute)), native.Select(r => r.Time));
        Assert.Equal([1234], native.Select((r, i) => (r, i)).Where(x => x.r.Flagged).Select(x => x.i));
        Assert.Equal(safe, native);
    }

    [Fact]
    public async Task AGridReadGivenBackToThePoolCannotBeReadAgainAndTheNextReadInTheSameMemoryGivesTheSameRows()
    {
        var (db, store) = await WithSite();
        using var _ = db;
        // Two years of hourly readings: read in time slices, joined into one pooled array.
        const long Hour = 3_600_000;
        var readings = Enumerable.Range(0, 2 * 8_760).Select(i => new IncomingReading(i, i * Hour, Math.Cos(i / 24.0) * 9, Math.Cos(i / 24.0) * 9, "C")).ToArray();
        await store.IngestAsync("site-a", readings, ConflictPolicy.Reject, Received);

        var first = (await store.ReadGridAsync("site-a", 0, 2 * 8_760 * Hour))!;
        var copy = first.ToArray();
        var pooled = Assert.IsType<PooledGridRows>(first);
        pooled.Dispose();
        var again = (await store.ReadGridAsync("site-a", 0, 2 * 8_760 * Hour))!;

        Assert.Throws<ObjectDisposedException>(() => pooled[0]);
        Assert.Equal(readings.Select(r => r.ValueC), copy.Select(r => r.ValueC));
        Assert.Equal(copy, again);
        ((IDisposable)again).Dispose();
        ((IDisposable)again).Dispose();
    }
}
