using ForecastHub.Core.Quality;
using ForecastHub.Storage.Readings;

namespace ForecastHub.Storage.Contract;

/// <summary>What every <see cref="IReadingStore"/> must do: each ingest outcome, QC flags with stored neighbours, reads and spans.</summary>
public abstract class ReadingStoreContract : StorageContract
{
    private async Task<IReadOnlyList<StoredReading>> AllAsync(string siteId = "site-a") =>
        (await Backend.Readings.ReadAsync(siteId, long.MinValue, long.MaxValue, null, 100_000))!;

    [Fact]
    public async Task NewReadingsAreAcceptedAndReadBackInTimeOrderWithWhatTheLoggerSent()
    {
        await CreateSiteAsync();
        IncomingReading[] batch =
        [
            new(0, Ms(Start.AddHours(2)), 4.5, 40.1, "F"),
            new(1, Ms(Start), 3.25, 276.4, "K"),
            new(2, Ms(Start.AddHours(1)), 4, 4, "C"),
        ];

        var result = await Backend.Readings.IngestAsync("site-a", batch, ConflictPolicy.Reject, Start);

        Assert.All(result!.Outcomes, o => Assert.Equal(new ReadingOutcome(ReadingOutcomeKind.Accepted, QualityFlags.None, null), o));
        Assert.Equal(
            [(Ms(Start), 3.25, 276.4, "K"), (Ms(Start.AddHours(1)), 4.0, 4.0, "C"), (Ms(Start.AddHours(2)), 4.5, 40.1, "F")],
            (await AllAsync()).Select(r => (r.TimeMs, r.ValueC, r.OriginalValue, r.OriginalUnit)));
    }

    [Fact]
    public async Task AnIngestCarryingTheKeyOfADeletedSiteStoresNothingInTheSiteCreatedAgain()
    {
        var old = await CreateSiteAsync();
        Assert.True(await Backend.Sites.DeleteAsync("site-a"));
        var renewed = await CreateSiteAsync();

        Assert.Null(await Backend.Readings.IngestAsync("site-a", Hourly(Start, 1, 2), ConflictPolicy.Reject, Start, old.Key));
        Assert.Empty(await AllAsync());

        var stored = await Backend.Readings.IngestAsync("site-a", Hourly(Start, 1, 2), ConflictPolicy.Reject, Start, renewed.Key);
        Assert.Equal(2, stored!.Outcomes.Count(o => o.Kind == ReadingOutcomeKind.Accepted));
        Assert.Equal([1.0, 2], (await AllAsync()).Select(r => r.ValueC));
    }

    [Fact]
    public async Task TheSameValueAgainIsADuplicateAndChangesNothing()
    {
        await CreateSiteAsync();
        await Backend.Readings.IngestAsync("site-a", Hourly(Start, 1.5, 2.5), ConflictPolicy.Reject, Start);

        // Within 1e-9 C is the same value; the duplicate keeps the first unit.
        var again = await Backend.Readings.IngestAsync("site-a", [new IncomingReading(0, Ms(Start), 1.5 + 1e-12, 34.7, "F")], ConflictPolicy.Reject, Start);

        Assert.Equal(ReadingOutcomeKind.Duplicate, again!.Outcomes[0].Kind);
        Assert.Equal(1.5, again.Outcomes[0].StoredValueC);
        Assert.Equal([(1.5, "C"), (2.5, "C")], (await AllAsync()).Select(r => (r.ValueC, r.OriginalUnit)));
    }

    [Fact]
    public async Task ADifferentValueIsAConflictUnlessReplaceIsAsked()
    {
        await CreateSiteAsync();
        await Backend.Readings.IngestAsync("site-a", Hourly(Start, 1, 2, 3), ConflictPolicy.Reject, Start);

        var refused = await Backend.Readings.IngestAsync("site-a", Hourly(Start.AddHours(1), 7), ConflictPolicy.Reject, Start);
        Assert.Equal((ReadingOutcomeKind.Conflict, (double?)2), (refused!.Outcomes[0].Kind, refused.Outcomes[0].StoredValueC));
        Assert.Equal([1.0, 2, 3], (await AllAsync()).Select(r => r.ValueC));

        var replaced = await Backend.Readings.IngestAsync("site-a", Hourly(Start.AddHours(1), 7), ConflictPolicy.Replace, Start);
        Assert.Equal((ReadingOutcomeKind.Replaced, (double?)2), (replaced!.Outcomes[0].Kind, replaced.Outcomes[0].StoredValueC));
        Assert.Equal([1.0, 7, 3], (await AllAsync()).Select(r => r.ValueC));
    }

    [Fact]
    public async Task RepeatsInsideOneBatchBehaveAsIfSentOneAfterAnother()
    {
        await CreateSiteAsync();
        var t = Ms(Start);
        IncomingReading[] batch = [new(0, t, 5, 5, "C"), new(1, t, 5, 5, "C"), new(2, t, 6, 6, "C")];

        var rejecting = await Backend.Readings.IngestAsync("site-a", batch, ConflictPolicy.Reject, Start);
        Assert.Equal([ReadingOutcomeKind.Accepted, ReadingOutcomeKind.Duplicate, ReadingOutcomeKind.Conflict], rejecting!.Outcomes.Select(o => o.Kind));
        Assert.Equal([5.0], (await AllAsync()).Select(r => r.ValueC));

        var replacing = await Backend.Readings.IngestAsync("site-a", [new(0, t, 8, 8, "C"), new(1, t, 9, 9, "C")], ConflictPolicy.Replace, Start);
        Assert.Equal([ReadingOutcomeKind.Replaced, ReadingOutcomeKind.Replaced], replacing!.Outcomes.Select(o => o.Kind));
        Assert.Equal([9.0], (await AllAsync()).Select(r => r.ValueC));
    }

    [Fact]
    public async Task AValueOutsideTheSiteLimitsIsStoredAndFlagged()
    {
        await CreateSiteAsync();

        var result = await Backend.Readings.IngestAsync("site-a", Hourly(Start, 10, 61, 10.5), ConflictPolicy.Reject, Start);

        Assert.True(result!.Outcomes[1].Flags.HasFlag(QualityFlags.OutOfRange));
        Assert.Equal(QualityFlags.OutOfRange, (await AllAsync())[1].Flags & QualityFlags.OutOfRange);
    }

    [Fact]
    public async Task ASpikeSpanningTwoBatchesFlagsTheStoredReading()
    {
        await CreateSiteAsync();
        await Backend.Readings.IngestAsync("site-a", Hourly(Start, 10, 10.5, 40), ConflictPolicy.Reject, Start);
        Assert.Equal(QualityFlags.None, (await AllAsync())[2].Flags);

        // The next reading falls back: the stored 40 now jumps away from both neighbours.
        await Backend.Readings.IngestAsync("site-a", Hourly(Start.AddHours(3), 11), ConflictPolicy.Reject, Start);

        Assert.Equal([QualityFlags.None, QualityFlags.None, QualityFlags.Spike, QualityFlags.None], (await AllAsync()).Select(r => r.Flags));
    }

    [Fact]
    public async Task AnIngestNamesTheEarliestTimeItWroteIncludingAStoredNeighbourItFlagged()
    {
        await CreateSiteAsync();
        var first = await Backend.Readings.IngestAsync("site-a", Hourly(Start.AddHours(1), 10.5, 40), ConflictPolicy.Reject, Start);
        Assert.Equal(Ms(Start.AddHours(1)), first!.EarliestChangeMs);

        // An earlier reading is written; the next one makes the stored 40 a spike, so that row is the earliest written.
        Assert.Equal(Ms(Start), (await Backend.Readings.IngestAsync("site-a", Hourly(Start, 10), ConflictPolicy.Reject, Start))!.EarliestChangeMs);
        Assert.Equal(Ms(Start.AddHours(2)), (await Backend.Readings.IngestAsync("site-a", Hourly(Start.AddHours(3), 11), ConflictPolicy.Reject, Start))!.EarliestChangeMs);

        // A duplicate and a refused conflict write nothing; a replacement writes its own time.
        Assert.Null((await Backend.Readings.IngestAsync("site-a", Hourly(Start, 10), ConflictPolicy.Reject, Start))!.EarliestChangeMs);
        Assert.Null((await Backend.Readings.IngestAsync("site-a", Hourly(Start, 12), ConflictPolicy.Reject, Start))!.EarliestChangeMs);
        Assert.Equal(Ms(Start.AddHours(1)), (await Backend.Readings.IngestAsync("site-a", Hourly(Start.AddHours(1), 10.25), ConflictPolicy.Replace, Start))!.EarliestChangeMs);
    }

    [Fact]
    public async Task AFlatLineIsFlaggedOnEveryReadingOfTheRun()
    {
        await CreateSiteAsync();

        // Default limits: the same value for at least 6 hours and 6 readings is a flat line.
        await Backend.Readings.IngestAsync("site-a", Hourly(Start, 3, 4, 4, 4, 4, 4, 4, 4, 5), ConflictPolicy.Reject, Start);

        var flags = (await AllAsync()).Select(r => r.Flags.HasFlag(QualityFlags.FlatLine)).ToArray();
        Assert.Equal([false, true, true, true, true, true, true, true, false], flags);
    }

    [Fact]
    public async Task AnUnknownSiteAnswersNullAndStoresNothing()
    {
        Assert.Null(await Backend.Readings.IngestAsync("nowhere", Hourly(Start, 1), ConflictPolicy.Reject, Start));
        Assert.Null(await Backend.Readings.ReadAsync("nowhere", long.MinValue, long.MaxValue, null, 10));
        Assert.Null(await Backend.Readings.SpanAsync("nowhere"));
    }

    [Fact]
    public async Task ReadsAreHalfOpenAndPageAfterTheLastTimeReturned()
    {
        await CreateSiteAsync();
        await Backend.Readings.IngestAsync("site-a", Hourly(Start, 0, 1, 2, 3, 4, 5, 6, 7), ConflictPolicy.Reject, Start);
        var from = Ms(Start.AddHours(1));
        var to = Ms(Start.AddHours(7));

        var first = await Backend.Readings.ReadAsync("site-a", from, to, null, 4);
        var second = await Backend.Readings.ReadAsync("site-a", from, to, first![^1].TimeMs, 4);

        Assert.Equal([1.0, 2, 3, 4], first.Select(r => r.ValueC));
        Assert.Equal([5.0, 6], second!.Select(r => r.ValueC));
    }

    [Fact]
    public async Task AGridReadIsHalfOpenInTimeOrderWithTheFlaggedReadingsMarked()
    {
        await CreateSiteAsync();
        // Out of order on purpose, and one value beyond the default range, which QC flags.
        await Backend.Readings.IngestAsync("site-a", Hourly(Start.AddHours(4), 4, 5, 6, 61), ConflictPolicy.Reject, Start);
        await Backend.Readings.IngestAsync("site-a", Hourly(Start, 0, 1, 2, 3), ConflictPolicy.Reject, Start);

        var grid = await Backend.Readings.ReadGridAsync("site-a", Ms(Start.AddHours(1)), Ms(Start.AddHours(8)));

        Assert.Equal(
            [(Start.AddHours(1), 1.0, false), (Start.AddHours(2), 2, false), (Start.AddHours(3), 3, false), (Start.AddHours(4), 4, false),
             (Start.AddHours(5), 5, false), (Start.AddHours(6), 6, false), (Start.AddHours(7), 61, true)],
            grid!.Select(r => (r.Time, r.ValueC, r.Flagged)));
        Assert.Empty((await Backend.Readings.ReadGridAsync("site-a", Ms(Start.AddDays(1)), Ms(Start.AddDays(2))))!);
        Assert.Null(await Backend.Readings.ReadGridAsync("nowhere", long.MinValue, long.MaxValue));
    }

    [Fact]
    public async Task AGridReadOverYearsGivesEveryReadingInTheRangeOnceInTimeOrder()
    {
        // Long enough for a backend to read it in slices; readings every 5 hours cross any slice bound at odd places.
        await CreateSiteAsync();
        var values = Enumerable.Range(0, 3 * 8760 / 5).Select(i => (double)i).ToArray();
        var readings = values.Select((v, i) => new IncomingReading(i, Ms(Start.AddHours(5 * i)), v, v, "C")).ToArray();
        await Backend.Readings.IngestAsync("site-a", readings, ConflictPolicy.Reject, Start);

        var from = Start.AddHours(1);
        var to = Start.AddHours(5 * (values.Length - 1));
        var grid = await Backend.Readings.ReadGridAsync("site-a", Ms(from), Ms(to));

        var expected = readings.Where(r => r.TimeMs >= Ms(from) && r.TimeMs < Ms(to)).Select(r => (DateTimeOffset.FromUnixTimeMilliseconds(r.TimeMs), r.ValueC));
        Assert.Equal(expected, grid!.Select(r => (r.Time, r.ValueC)));
    }

    [Fact]
    public async Task TheSpanIsTheFirstAndLastReadingAndNullWithoutReadings()
    {
        await CreateSiteAsync();
        Assert.Null(await Backend.Readings.SpanAsync("site-a"));

        await Backend.Readings.IngestAsync("site-a", Hourly(Start.AddHours(5), 1), ConflictPolicy.Reject, Start);
        await Backend.Readings.IngestAsync("site-a", Hourly(Start, 1), ConflictPolicy.Reject, Start);

        var span = (await Backend.Readings.SpanAsync("site-a"))!.Value;
        Assert.Equal((Ms(Start), Ms(Start.AddHours(5)), 2L), (span.FirstMs, span.LastMs, span.Count));
    }

    [Fact]
    public async Task ManyReadingsInOneBatchAreAllStoredBitForBit()
    {
        await CreateSiteAsync();
        var values = Enumerable.Range(0, 1234).Select(i => Math.Sin(i / 7.0) * 3 + 0.1 / 3).ToArray();

        var result = await Backend.Readings.IngestAsync("site-a", Hourly(Start, values), ConflictPolicy.Reject, Start);

        Assert.All(result!.Outcomes, o => Assert.Equal(ReadingOutcomeKind.Accepted, o.Kind));
        Assert.Equal(values, (await AllAsync()).Select(r => r.ValueC));
    }
}
