using System.Runtime.CompilerServices;
using Microsoft.Data.Sqlite;
using SQLitePCL;

namespace ForecastHub.Storage;

/// <summary>
/// The SQLite file: pooled connections for reads, and the one writer path. Every write runs under
/// one in-process lock inside <c>BEGIN IMMEDIATE</c>, so concurrent requests queue instead of
/// failing with "database is locked", and the busy timeout covers other processes on the file.
/// Connections use <c>synchronous=FULL</c>: in WAL mode each commit is fsynced before it returns,
/// so an acknowledged write survives a killed process and a power cut.
/// </summary>
public sealed class SqliteDatabase : IDisposable
{
    private readonly SemaphoreSlim _writeLock = new(1, 1);
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
        WriteAsync(work, foreignKeys: true, waitForDisk: true, cancellationToken);

    /// <summary>As <see cref="WriteAsync{T}(Func{SqliteConnection, SqliteTransaction, T}, CancellationToken)"/>, with foreign
    /// keys off for the transaction, for a migration that rebuilds a parent table (dropping it must not
    /// cascade to its children). Every foreign key is checked before the commit; a dangling one rolls it back.</summary>
    public Task<T> WriteWithoutForeignKeysAsync<T>(Func<SqliteConnection, SqliteTransaction, T> work, CancellationToken cancellationToken = default) =>
        WriteAsync(work, foreignKeys: false, waitForDisk: true, cancellationToken);

    /// <summary>
    /// As <see cref="WriteAsync{T}(Func{SqliteConnection, SqliteTransaction, T}, CancellationToken)"/> for a write that a
    /// crash may lose without harm because the next evaluation makes it again: committed with <c>synchronous=NORMAL</c>,
    /// so the commit does not wait for the disk. The file stays consistent, and the next durable commit makes it durable too.
    /// </summary>
    public Task<T> WriteRecomputableAsync<T>(Func<SqliteConnection, SqliteTransaction, T> work, CancellationToken cancellationToken = default) =>
        WriteAsync(work, foreignKeys: true, waitForDisk: false, cancellationToken);

    private async Task<T> WriteAsync<T>(Func<SqliteConnection, SqliteTransaction, T> work, bool foreignKeys, bool waitForDisk, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(work);
        await _writeLock.WaitAsync(cancellationToken).ConfigureAwait(false);
        try
        {
            using var connection = Open();
            // These pragmas are set outside the transaction and set back before the connection returns to the pool;
            // it is forgotten as set up first, so its next use sets them again even if the reset fails.
            var changed = !foreignKeys || !waitForDisk;
            if (changed)
            {
                _prepared.Remove(connection.Handle!);
                Pragma(connection, $"PRAGMA foreign_keys = {(foreignKeys ? "ON" : "OFF")}; PRAGMA synchronous = {(waitForDisk ? "FULL" : "NORMAL")};");
            }
            try
            {
                using var transaction = connection.BeginTransaction(deferred: false);
                var result = work(connection, transaction);
                if (!foreignKeys)
                {
                    CheckForeignKeys(connection, transaction);
                }
                transaction.Commit();
                Health.WriteSucceeded();
                return result;
            }
            finally
            {
                if (changed)
                {
                    Pragma(connection, _setUpPragmas);
                    _prepared.TryAdd(connection.Handle!, connection.Handle!);
                }
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
