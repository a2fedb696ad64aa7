using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage.Tests;

public sealed class SqliteDatabaseTests
{
    private static (long ForeignKeys, long BusyTimeout, long Synchronous) Settings(SqliteConnection connection)
    {
        long Read(string pragma)
        {
            using var command = connection.CreateCommand();
            command.CommandText = $"PRAGMA {pragma};";
            return (long)command.ExecuteScalar()!;
        }

        return (Read("foreign_keys"), Read("busy_timeout"), Read("synchronous"));
    }

    [Fact]
    public void EveryConnectionHasForeignKeysTheBusyTimeoutAndFullSyncWhetherNewOrReusedFromThePool()
    {
        using var db = new TestDatabase();
        var expected = (1L, (long)new StorageOptions().BusyTimeoutMs, 2L); // synchronous FULL is 2

        // Two at once: the second is a new native connection; later opens reuse pooled ones.
        using (var first = db.Database.Open())
        using (var second = db.Database.Open())
        {
            Assert.Equal(expected, Settings(first));
            Assert.Equal(expected, Settings(second));
        }

        for (var i = 0; i < 3; i++)
        {
            using var reused = db.Database.Open();
            Assert.Equal(expected, Settings(reused));
        }
    }

    [Fact]
    public async Task AConnectionUsedWithoutForeignKeysHasThemAgainWhenReusedEvenAfterItsWorkFailed()
    {
        using var db = new TestDatabase();
        await Assert.ThrowsAsync<InvalidOperationException>(() =>
            db.Database.WriteWithoutForeignKeysAsync<int>((_, _) => throw new InvalidOperationException("the work failed")));
        Assert.Equal(0, await db.Database.WriteWithoutForeignKeysAsync((connection, _) => Settings(connection).ForeignKeys));

        using var reused = db.Database.Open();
        Assert.Equal(1, Settings(reused).ForeignKeys);
    }

    [Fact]
    public async Task ARecomputableWriteCommitsWithoutWaitingForTheDiskAndLeavesTheConnectionAsItWas()
    {
        using var db = new TestDatabase();
        db.Execute("CREATE TABLE notes (text TEXT NOT NULL);");

        var during = await db.Database.WriteRecomputableAsync((connection, transaction) =>
        {
            using var insert = connection.CreateCommand();
            insert.Transaction = transaction;
            insert.CommandText = "INSERT INTO notes VALUES ('refreshed');";
            insert.ExecuteNonQuery();
            return Settings(connection);
        });

        Assert.Equal((1L, 1L), (during.ForeignKeys, during.Synchronous)); // synchronous NORMAL is 1
        Assert.Equal("refreshed", db.Scalar<string>("SELECT text FROM notes;"));
        using var reused = db.Database.Open();
        Assert.Equal((1L, 2L), (Settings(reused).ForeignKeys, Settings(reused).Synchronous));
    }

    [Fact]
    public void PartsReadSideBySideOnOtherConnectionsSeeTheSnapshotOfTheFirstConnectionsTransaction()
    {
        using var db = new TestDatabase();
        db.Execute("PRAGMA journal_mode = WAL; CREATE TABLE notes (text TEXT NOT NULL); INSERT INTO notes VALUES ('before');");

        var parts = db.Database.Read((connection, transaction) =>
        {
            Assert.Equal(1L, CountNotes(connection, transaction));

            // Committed after the transaction's snapshot was taken: no part may see it.
            db.Execute("INSERT INTO notes VALUES ('after');");
            return db.Database.ReadPartsOnSnapshot(connection, transaction, 3, (reader, readTransaction, _) =>
                (CountNotes(reader, readTransaction), ReferenceEquals(reader, connection)));
        });

        Assert.Equal([(1L, true), (1L, false), (1L, false)], parts);
        Assert.Equal(2L, db.Scalar<long>("SELECT count(*) FROM notes;"));
    }

    [Fact]
    public void WithoutWalEveryPartIsReadOnTheFirstConnectionInItsTransaction()
    {
        using var db = new TestDatabase();
        db.Execute("CREATE TABLE notes (text TEXT NOT NULL); INSERT INTO notes VALUES ('only');");

        var parts = db.Database.Read((connection, transaction) =>
        {
            CountNotes(connection, transaction);
            return db.Database.ReadPartsOnSnapshot(connection, transaction, 2, (reader, _, i) => (i, ReferenceEquals(reader, connection)));
        });

        Assert.Equal([(0, true), (1, true)], parts);
    }

    private static long CountNotes(SqliteConnection connection, SqliteTransaction transaction)
    {
        using var count = connection.CreateCommand();
        count.Transaction = transaction;
        count.CommandText = "SELECT count(*) FROM notes;";
        return (long)count.ExecuteScalar()!;
    }
}
