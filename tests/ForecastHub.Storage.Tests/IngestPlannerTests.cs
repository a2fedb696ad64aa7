using ForecastHub.Core.Quality;
using ForecastHub.Storage.Readings;

namespace ForecastHub.Storage.Tests;

public sealed class IngestPlannerTests
{
    private const long Hour = 3_600_000;

    private static IncomingReading In(int index, long hour, double value, string unit = "C") => new(index, hour * Hour, value, value, unit);

    private static StoredReading Stored(long hour, double value, QualityFlags flags = QualityFlags.None) => new(hour * Hour, value, value, "C", flags);

    private static IngestPlan Plan(StoredReading[] stored, IncomingReading[] incoming, ConflictPolicy policy = ConflictPolicy.Reject) =>
        IngestPlanner.Plan(stored, incoming, policy, QualityLimits.Default);

    [Fact]
    public void NewReadingsAreInsertedInTimeOrder()
    {
        var plan = Plan([], [In(0, 2, 5), In(1, 1, 4)]);

        Assert.Equal([1 * Hour, 2 * Hour], plan.Inserts.Select(r => r.TimeMs));
        Assert.All(plan.Outcomes, o => Assert.Equal(ReadingOutcomeKind.Accepted, o.Kind));
        Assert.Empty(plan.Updates);
    }

    [Fact]
    public void TheSameValueAgainIsADuplicateEvenInAnotherUnit()
    {
        var plan = Plan([Stored(1, 10)], [new IncomingReading(0, Hour, 10 + 1e-12, 50, "F")]);

        Assert.Equal(ReadingOutcomeKind.Duplicate, plan.Outcomes[0].Kind);
        Assert.Empty(plan.Inserts);
        Assert.Empty(plan.Updates);
    }

    [Fact]
    public void AnotherValueIsAConflictThatChangesNothing()
    {
        var plan = Plan([Stored(1, 10)], [In(0, 1, 11)]);

        Assert.Equal(new ReadingOutcome(ReadingOutcomeKind.Conflict, QualityFlags.None, 10), plan.Outcomes[0]);
        Assert.Empty(plan.Inserts);
        Assert.Empty(plan.Updates);
    }

    [Fact]
    public void ReplaceRewritesTheStoredValueAndJudgesItAfresh()
    {
        var plan = Plan([Stored(0, 10), Stored(1, 40, QualityFlags.Spike), Stored(2, 10)], [In(0, 1, 11)], ConflictPolicy.Replace);

        Assert.Equal(ReadingOutcomeKind.Replaced, plan.Outcomes[0].Kind);
        Assert.Equal(new StoredReading(Hour, 11, 11, "C", QualityFlags.None), plan.Updates.Single());
    }

    [Fact]
    public void RepeatsInsideOneBatchAreDuplicatesOrConflictsOfTheFirst()
    {
        var plan = Plan([], [In(0, 1, 10), In(1, 1, 10), In(2, 1, 12)]);

        Assert.Equal([ReadingOutcomeKind.Accepted, ReadingOutcomeKind.Duplicate, ReadingOutcomeKind.Conflict], plan.Outcomes.Select(o => o.Kind));
        Assert.Equal(10, plan.Inserts.Single().ValueC);
    }

    [Fact]
    public void AStoredReadingBecomesASpikeWhenItsNextNeighbourArrives()
    {
        var plan = Plan([Stored(0, 10), Stored(1, 30)], [In(0, 2, 10.5)]);

        Assert.Equal(new StoredReading(Hour, 30, 30, "C", QualityFlags.Spike), plan.Updates.Single());
        Assert.Equal(QualityFlags.None, plan.Inserts.Single().Flags);
    }

    [Fact]
    public void StoredFlagsAreNeverTakenAway()
    {
        // The stored out-of-range flag came from limits at the time; a new neighbour does not clear it.
        var plan = Plan([Stored(0, 10, QualityFlags.OutOfRange)], [In(0, 1, 10.5)]);

        Assert.Empty(plan.Updates);
    }

    [Theory]
    [InlineData(ConflictPolicy.Reject)]
    [InlineData(ConflictPolicy.Replace)]
    public void SortedBatchesGetTheSamePlanAsTheGeneralPath(ConflictPolicy policy)
    {
        var random = new Random(5);
        for (var trial = 0; trial < 300; trial++)
        {
            // Stored and new hours interleave and overlap; values repeat so flat lines, duplicates and conflicts occur.
            var hours = Enumerable.Range(0, 60).Where(_ => random.Next(3) > 0).ToArray();
            var stored = hours.Where(_ => random.Next(2) == 0)
                .Select(h => Stored(h, random.Next(4) * 7.5, random.Next(4) == 0 ? QualityFlags.OutOfRange : QualityFlags.None)).ToArray();
            var incoming = hours.Where(_ => random.Next(2) == 0).Select((h, i) => In(i, h, random.Next(4) * 7.5)).ToArray();

            var sorted = IngestPlanner.Plan(stored, incoming, policy, QualityLimits.Default);
            var general = IngestPlanner.PlanAnyOrder(stored, incoming, policy, QualityLimits.Default);

            Assert.Equal(general.Inserts, sorted.Inserts);
            Assert.Equal(general.Updates, sorted.Updates);
            Assert.Equal(general.Outcomes, sorted.Outcomes);
        }
    }
}
