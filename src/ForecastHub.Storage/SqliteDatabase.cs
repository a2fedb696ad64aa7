using System.Runtime.CompilerServices;
using System.Runtime.ExceptionServices;
using Microsoft.Data.Sqlite;
using SQLitePCL;

namespace ForecastHub.Storage;

/// <summary>
/// The SQLite file: pooled connections for reads, and the one writer path. Every write runs under
/// one in-process lock inside <c>BEGIN IMMEDIATE</c>, so concurrent requests queue instead of
/// failing with "database is locked", and the busy timeout covers other processes on the file.
/// Connections use <c>synchronous=FULL</c>: in WAL mode each commit is fsynced before it returns,
/// so an acknowledged write survives a killed process and a power cut.
/// Group commit: writes that queued while another held the lock run together in the next
/// transaction, each in its own savepoint, so one fsync serves them all. A write that throws is
/// rolled back to its savepoint alone; one commit makes all of them durable, or none of them.
/// A transaction of recomputable writes only (<see cref="WriteRecomputableAsync"/>) commits without the fsync.
/// </summary>
public sealed class SqliteDatabase : IDisposable
{
    private readonly SemaphoreSlim _writeLock = new(1, 1);
    // Writes waiting for the write lock, in arrival order; whoever holds the lock runs them all.
    private readonly List<QueuedWrite> _queued = [];
    // Native connections already given the per-connection pragmas: a pooled connection keeps them, so each is set up once.
    private readonly ConditionalWeakTable<sqlite3, object> _prepared = new();
    private readonly string _setUpPragmas;
    private volatile bool _folderExists;

    public SqliteDatabase(StorageOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        FilePath = System.IO.Path.GetFullPath(options.Path);
        ConnectionString = new SqliteConnectionStringBuilder
        {
            DataSource = FilePath,
            Mode = SqliteOpenMode.ReadWriteCreate,
            Cache = SqliteCacheMode.Private,
            Pooling = true,
            DefaultTimeout = Math.Max(1, options.BusyTimeoutMs / 1000),
        }.ToString();
        var maxPageCount = options.MaxSizeMb is { } mb ? $" PRAGMA max_page_count = {mb * 1024L * 1024L / 4096};" : "";
        _setUpPragmas = $"PRAGMA foreign_keys = ON; PRAGMA busy_timeout = {options.BusyTimeoutMs}; PRAGMA synchronous = FULL;{maxPageCount}";
    }

    public string FilePath { get; }

    /// <summary>What SQLite has reported about the file since start: damage, or a full disk.</summary>
    public StorageHealth Health { get; } = new();

    public string ConnectionString { get; }

    /// <summary>A pooled connection (foreign keys on, the busy timeout, synchronous=FULL); dispose it after the unit of work.</summary>
    public SqliteConnection Open()
    {
        if (!_folderExists)
        {
            var folder = System.IO.Path.GetDirectoryName(FilePath);
            if (!string.IsNullOrEmpty(folder))
            {
                Directory.CreateDirectory(folder);
            }
            _folderExists = true;
        }
        var connection = new SqliteConnection(ConnectionString);
        connection.Open();
        var handle = connection.Handle!;
        if (!_prepared.TryGetValue(handle, out _))
        {
            Pragma(connection, _setUpPragmas);
            _prepared.TryAdd(handle, handle);
        }
        return connection;
    }

    /// <summary>Runs <paramref name="work"/> as the only writer, in one IMMEDIATE transaction that
    /// commits when it returns and rolls back when it throws.</summary>
    public Task<T> WriteAsync<T>(Func<SqliteConnection, SqliteTransaction, T> work, CancellationToken cancellationToken = default) =>
        WriteAsync(work, waitForDisk: true, cancellationToken);

    /// <summary>As <see cref="WriteAsync{T}(Func{SqliteConnection, SqliteTransaction, T}, CancellationToken)"/>, with foreign
    /// keys off for the transaction, for a migration that rebuilds a parent table (dropping it must not
    /// cascade to its children). Every foreign key is checked before the commit; a dangling one rolls it back.</summary>
    public Task<T> WriteWithoutForeignKeysAsync<T>(Func<SqliteConnection, SqliteTransaction, T> work, CancellationToken cancellationToken = default) =>
        WriteAloneWithoutForeignKeysAsync(work, cancellationToken);

    /// <summary>
    /// As <see cref="WriteAsync{T}(Func{SqliteConnection, SqliteTransaction, T}, CancellationToken)"/> for a write that a
    /// crash may lose without harm because the next evaluation makes it again: when its transaction holds only such
    /// writes, it commits with <c>synchronous=NORMAL</c> and does not wait for the disk. The file stays consistent,
    /// and the next durable commit makes it durable too.
    /// </summary>
    public Task<T> WriteRecomputableAsync<T>(Func<SqliteConnection, SqliteTransaction, T> work, CancellationToken cancellationToken = default) =>
        WriteAsync(work, waitForDisk: false, cancellationToken);

    private async Task<T> WriteAsync<T>(Func<SqliteConnection, SqliteTransaction, T> work, bool waitForDisk, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(work);
        var write = new QueuedWrite<T>(work, waitForDisk);
        lock (_queued)
        {
            _queued.Add(write);
        }
        try
        {
            await _writeLock.WaitAsync(cancellationToken).ConfigureAwait(false);
        }
        catch (OperationCanceledException)
        {
            lock (_queued)
            {
                // Still waiting: withdrawn. Otherwise another writer has taken it, and its outcome stands.
                if (_queued.Remove(write))
                {
                    throw;
                }
            }
            return await write.Done.Task.ConfigureAwait(false);
        }
        try
        {
            // Run by an earlier holder already: every write still queued has its own caller waiting for the lock.
            if (!write.Done.Task.IsCompleted)
            {
                RunQueued();
            }
        }
        finally
        {
            _writeLock.Release();
        }
        return await write.Done.Task.ConfigureAwait(false);
    }

    /// <summary>Writes waiting for the write lock (tests wait on it to build a shared transaction).</summary>
    internal int QueuedWrites
    {
        get
        {
            lock (_queued)
            {
                return _queued.Count;
            }
        }
    }

    // Under the write lock: every queued write, the caller's own among them, in one transaction.
    private void RunQueued()
    {
        List<QueuedWrite> batch;
        lock (_queued)
        {
            batch = [.. _queued];
            _queued.Clear();
        }
        try
        {
            using var connection = Open();
            var waitForDisk = batch.Exists(w => w.WaitForDisk);
            if (!waitForDisk)
            {
                ChangeSetUp(connection, "PRAGMA synchronous = NORMAL;");
            }
            using var transaction = connection.BeginTransaction(deferred: false);
            foreach (var write in batch)
            {
                if (batch.Count == 1)
                {
                    write.Run(connection, transaction);
                }
                else
                {
                    RunInSavepoint(write, connection, transaction);
                }
            }
            if (batch.Exists(w => w.Error is null))
            {
                transaction.Commit();
                Health.WriteSucceeded();
            }
            if (!waitForDisk)
            {
                RestoreSetUp(connection, "PRAGMA synchronous = FULL;");
            }
        }
        catch (Exception error)
        {
            // Opening, BEGIN or COMMIT failed, or SQLite ended the transaction itself: nothing of the batch is stored.
            foreach (var write in batch)
            {
                write.Error ??= error;
            }
        }
        foreach (var write in batch)
        {
            if (write.Error is SqliteException sqliteError)
            {
                Health.Observe(sqliteError);
            }
            write.Complete();
        }
    }

    private const string WriteSavepoint = "queued_write";

    // A failed write is undone back to its savepoint, unless SQLite rolled back the whole transaction
    // (a full disk, an I/O error): then the batch fails, as none of its writes can be committed.
    private static void RunInSavepoint(QueuedWrite write, SqliteConnection connection, SqliteTransaction transaction)
    {
        transaction.Save(WriteSavepoint);
        write.Run(connection, transaction);
        if (write.Error is null)
        {
            transaction.Release(WriteSavepoint);
            return;
        }
        if (raw.sqlite3_get_autocommit(connection.Handle) != 0)
        {
            throw write.Error;
        }
        transaction.Rollback(WriteSavepoint);
        transaction.Release(WriteSavepoint);
    }

    private abstract class QueuedWrite(bool waitForDisk)
    {
        /// <summary>False for a recomputable write, whose commit need not wait for the disk.</summary>
        public bool WaitForDisk { get; } = waitForDisk;

        /// <summary>What the work threw, or what made its transaction fail.</summary>
        public Exception? Error { get; set; }

        public abstract void Run(SqliteConnection connection, SqliteTransaction transaction);

        /// <summary>Hands the outcome to the waiting caller, after the commit (or its failure).</summary>
        public abstract void Complete();
    }

    private sealed class QueuedWrite<T>(Func<SqliteConnection, SqliteTransaction, T> work, bool waitForDisk) : QueuedWrite(waitForDisk)
    {
        private T? _result;

        // Continuations run on the thread pool, not on the writer that holds the lock.
        public TaskCompletionSource<T> Done { get; } = new(TaskCreationOptions.RunContinuationsAsynchronously);

        public override void Run(SqliteConnection connection, SqliteTransaction transaction)
        {
            try
            {
                _result = work(connection, transaction);
            }
            catch (Exception error)
            {
                Error = error;
            }
        }

        public override void Complete()
        {
            if (Error is null)
            {
                Done.SetResult(_result!);
            }
            else
            {
                Done.SetException(Error);
            }
        }
    }

    // Alone in its transaction, with foreign keys off for it (never shared with queued writes).
    private async Task<T> WriteAloneWithoutForeignKeysAsync<T>(Func<SqliteConnection, SqliteTransaction, T> work, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(work);
        await _writeLock.WaitAsync(cancellationToken).ConfigureAwait(false);
        try
        {
            using var connection = Open();
            ChangeSetUp(connection, "PRAGMA foreign_keys = OFF;");
            try
            {
                using var transaction = connection.BeginTransaction(deferred: false);
                var result = work(connection, transaction);
                CheckForeignKeys(connection, transaction);
                transaction.Commit();
                Health.WriteSucceeded();
                return result;
            }
            finally
            {
                RestoreSetUp(connection, "PRAGMA foreign_keys = ON;");
            }
        }
        catch (SqliteException error)
        {
            Health.Observe(error);
            throw;
        }
        finally
        {
            _writeLock.Release();
        }
    }

    private static void CheckForeignKeys(SqliteConnection connection, SqliteTransaction transaction)
    {
        using var check = connection.Command(transaction, "PRAGMA foreign_key_check;");
        using var reader = check.ExecuteReader();
        if (reader.Read())
        {
            throw new SqliteException($"A row of table '{reader.GetString(0)}' refers to a missing row of '{reader.GetString(2)}'; nothing was changed.", SqliteConstraint);
        }
    }

    private const int SqliteConstraint = 19;

    // Changes one of the connection's pragmas for one write, outside its transaction (these pragmas do nothing inside one).
    // The connection is forgotten as set up first, so its next open sets it up again even if RestoreSetUp fails.
    private void ChangeSetUp(SqliteConnection connection, string pragma)
    {
        _prepared.Remove(connection.Handle!);
        Pragma(connection, pragma);
    }

    // Sets back what ChangeSetUp changed. A failure here must not fail a write that committed; the connection then stays
    // forgotten and its next open sets it up.
    private void RestoreSetUp(SqliteConnection connection, string pragma)
    {
        try
        {
            Pragma(connection, pragma);
            _prepared.TryAdd(connection.Handle!, connection.Handle!);
        }
        catch (SqliteException error)
        {
            Health.Observe(error);
        }
    }

    private static void Pragma(SqliteConnection connection, string pragmas)
    {
        using var pragma = connection.CreateCommand();
        pragma.CommandText = pragmas;
        pragma.ExecuteNonQuery();
    }

    /// <summary>Runs <paramref name="read"/> on a pooled connection inside one read transaction, so
    /// it sees one consistent snapshot while writers go on.</summary>
    public T Read<T>(Func<SqliteConnection, SqliteTransaction, T> read)
    {
        ArgumentNullException.ThrowIfNull(read);
        try
        {
            using var connection = Open();
            using var transaction = connection.BeginTransaction(deferred: true);
            return read(connection, transaction);
        }
        catch (SqliteException error)
        {
            Health.Observe(error);
            throw;
        }
    }

    /// <summary>
    /// Runs <paramref name="part"/> for parts 0 .. <paramref name="parts"/> - 1 side by side, part 0 on
    /// <paramref name="connection"/> in <paramref name="transaction"/> and each other part on a pooled connection of its
    /// own, all reading the snapshot that <paramref name="transaction"/> holds (it must have read already).
    /// A part whose connection cannot open that snapshot runs on <paramref name="connection"/> afterwards,
    /// so every part sees the same data as a serial read in that transaction would.
    /// </summary>
    public T[] ReadPartsOnSnapshot<T>(SqliteConnection connection, SqliteTransaction transaction, int parts, Func<SqliteConnection, SqliteTransaction, int, T> part)
    {
        ArgumentNullException.ThrowIfNull(connection);
        ArgumentNullException.ThrowIfNull(transaction);
        ArgumentNullException.ThrowIfNull(part);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(parts);
        var results = new T[parts];
        if (parts == 1 || raw.sqlite3_snapshot_get(connection.Handle, "main", out var snapshot) != raw.SQLITE_OK)
        {
            for (var i = 0; i < parts; i++)
            {
                results[i] = part(connection, transaction, i);
            }

            return results;
        }

        using (snapshot)
        {
            var done = new bool[parts];
            // The calling thread takes part of the loop itself, so a busy thread pool delays the parts but never strands them.
            try
            {
                Parallel.For(0, parts, i => RunPart(i));
            }
            catch (AggregateException error)
            {
                // The caller sees SQLite's error as from a serial read (Read observes it for the storage health).
                ExceptionDispatchInfo.Throw(error.InnerExceptions[0]);
            }

            void RunPart(int i)
            {
                if (i == 0)
                {
                    results[0] = part(connection, transaction, 0);
                    done[0] = true;
                    return;
                }

                using var other = Open();
                // A connection learns that the file is in WAL mode from its first read; it cannot open a snapshot before.
                Pragma(other, "PRAGMA schema_version;");
                using var otherTransaction = other.BeginTransaction(deferred: true);
                if (raw.sqlite3_snapshot_open(other.Handle, "main", snapshot) == raw.SQLITE_OK)
                {
                    results[i] = part(other, otherTransaction, i);
                    done[i] = true;
                }
            }

            for (var i = 1; i < parts; i++)
            {
                if (!done[i])
                {
                    results[i] = part(connection, transaction, i);
                }
            }
        }

        return results;
    }

    /// <summary>Runs SQLite's integrity check (<c>quick</c>: <c>PRAGMA quick_check</c>, which skips
    /// matching indexes to their tables) and answers what it reports, empty when the file is sound.</summary>
    public IReadOnlyList<string> Check(bool quick, int maxProblems)
    {
        using var connection = Open();
        using var check = connection.CreateCommand();
        check.CommandText = $"PRAGMA {(quick ? "quick_check" : "integrity_check")}({Math.Max(1, maxProblems)});";
        using var reader = check.ExecuteReader();
        var rows = new List<string>();
        while (reader.Read())
        {
            rows.Add(reader.GetString(0));
        }
        return rows is ["ok"] ? [] : rows;
    }

    public void Dispose() => _writeLock.Dispose();
}
