using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage.Tests;

/// <summary>Group commit on SQLite: writes that queue behind a running write share its successor's
/// transaction, each in a savepoint. A write that throws leaves the others' rows stored and none of its
/// own; a commit that fails leaves none of the batch (what a crash before the fsync leaves too).</summary>
public sealed class GroupCommitTests : IDisposable
{
    private readonly TestDatabase _file = new();

    public GroupCommitTests() =>
        _file.Execute("""
            CREATE TABLE parent (k INTEGER PRIMARY KEY);
            CREATE TABLE child (k INTEGER PRIMARY KEY, parent_k INTEGER NOT NULL REFERENCES parent (k) DEFERRABLE INITIALLY DEFERRED);
            INSERT INTO parent (k) VALUES (1);
            """);

    [Fact]
    public async Task AFailingWriteInASharedTransactionLeavesTheOthersStoredAndNoneOfItsOwnRows()
    {
        var database = _file.Database;
        using var release = new ManualResetEventSlim();
        var (blocker, blockerTransaction) = await HoldTheWriteLock(database, release);

        var first = database.WriteAsync((connection, transaction) => Insert(connection, transaction, 10, 11));
        var failing = database.WriteAsync<SqliteTransaction>((connection, transaction) =>
        {
            Insert(connection, transaction, 20, 21);
            throw new InvalidOperationException("this write fails after its inserts");
        });
        var last = database.WriteAsync((connection, transaction) => Insert(connection, transaction, 30, 31));
        await WaitUntil(() => database.QueuedWrites == 3);
        release.Set();
        await blocker;

        var error = await Assert.ThrowsAsync<InvalidOperationException>(() => failing);
        Assert.Equal("this write fails after its inserts", error.Message);
        var (firstTransaction, lastTransaction) = (await first, await last);
        Assert.Same(firstTransaction, lastTransaction);
        Assert.NotSame(blockerTransaction, firstTransaction);
        Assert.Equal("10,11,30,31", _file.Scalar<string>("SELECT group_concat(k, ',') FROM (SELECT k FROM child ORDER BY k);"));
    }

    [Fact]
    public async Task ABatchWhoseCommitFailsLeavesNoneOfItsWritesAndEveryCallerLearnsIt()
    {
        var database = _file.Database;
        using var release = new ManualResetEventSlim();
        var (blocker, _) = await HoldTheWriteLock(database, release);

        var first = database.WriteAsync((connection, transaction) => Insert(connection, transaction, 10, 11));
        // A child of a missing parent: the deferred foreign key fails the COMMIT, not the insert.
        var dangling = database.WriteAsync((connection, transaction) => Insert(connection, transaction, 20, 21, parent: 2));
        await WaitUntil(() => database.QueuedWrites == 2);
        release.Set();
        await blocker;

        Assert.Contains("FOREIGN KEY", (await Assert.ThrowsAsync<SqliteException>(() => first)).Message, StringComparison.Ordinal);
        Assert.Contains("FOREIGN KEY", (await Assert.ThrowsAsync<SqliteException>(() => dangling)).Message, StringComparison.Ordinal);
        Assert.Equal(0L, _file.Scalar<long>("SELECT count(*) FROM child;"));
        Assert.Equal(7L, await database.WriteAsync((connection, transaction) =>
        {
            Insert(connection, transaction, 7);
            return 7L;
        }));
        Assert.Equal(1L, _file.Scalar<long>("SELECT count(*) FROM child;"));
    }

    [Fact]
    public async Task AWriteCancelledWhileQueuedIsNeverRun()
    {
        var database = _file.Database;
        using var release = new ManualResetEventSlim();
        var (blocker, _) = await HoldTheWriteLock(database, release);
        using var cancel = new CancellationTokenSource();

        var cancelled = database.WriteAsync((connection, transaction) => Insert(connection, transaction, 10), cancel.Token);
        var kept = database.WriteAsync((connection, transaction) => Insert(connection, transaction, 20));
        await WaitUntil(() => database.QueuedWrites == 2);
        await cancel.CancelAsync();
        await Assert.ThrowsAnyAsync<OperationCanceledException>(() => cancelled);
        release.Set();
        await blocker;
        await kept;

        Assert.Equal("20", _file.Scalar<string>("SELECT group_concat(k, ',') FROM child;"));
    }

    // A write that holds the lock (inside its transaction) until released; answers once it is running.
    private static async Task<(Task<SqliteTransaction> Write, SqliteTransaction Transaction)> HoldTheWriteLock(
        SqliteDatabase database, ManualResetEventSlim release)
    {
        var running = new TaskCompletionSource<SqliteTransaction>(TaskCreationOptions.RunContinuationsAsynchronously);
        var write = Task.Run(() => database.WriteAsync((connection, transaction) =>
        {
            running.SetResult(transaction);
            release.Wait(TimeSpan.FromMinutes(1));
            return transaction;
        }));
        return (write, await running.Task);
    }

    private static SqliteTransaction Insert(SqliteConnection connection, SqliteTransaction transaction, params int[] keys) =>
        Insert(connection, transaction, keys, parent: 1);

    private static SqliteTransaction Insert(SqliteConnection connection, SqliteTransaction transaction, int first, int second, int parent) =>
        Insert(connection, transaction, [first, second], parent);

    private static SqliteTransaction Insert(SqliteConnection connection, SqliteTransaction transaction, int[] keys, int parent)
    {
        foreach (var key in keys)
        {
            using var insert = connection.CreateCommand();
            insert.Transaction = transaction;
            insert.CommandText = "INSERT INTO child (k, parent_k) VALUES ($k, $parent);";
            insert.Parameters.AddWithValue("$k", key);
            insert.Parameters.AddWithValue("$parent", parent);
            insert.ExecuteNonQuery();
        }
        return transaction;
    }

    private static async Task WaitUntil(Func<bool> condition)
    {
        var deadline = DateTime.UtcNow.AddMinutes(1);
        while (!condition())
        {
            Assert.True(DateTime.UtcNow < deadline, "the condition did not hold within a minute");
            await Task.Yield();
        }
    }

    public void Dispose() => _file.Dispose();
}
