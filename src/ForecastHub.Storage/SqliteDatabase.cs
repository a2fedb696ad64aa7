using Microsoft.Data.Sqlite;

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
    private readonly int _busyTimeoutMs;
    private readonly string _maxPageCountPragma;

    public SqliteDatabase(StorageOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        FilePath = System.IO.Path.GetFullPath(options.Path);
        _busyTimeoutMs = options.BusyTimeoutMs;
        ConnectionString = new SqliteConnectionStringBuilder
        {
            DataSource = FilePath,
            Mode = SqliteOpenMode.ReadWriteCreate,
            Cache = SqliteCacheMode.Private,
            Pooling = true,
            ForeignKeys = true,
            DefaultTimeout = Math.Max(1, options.BusyTimeoutMs / 1000),
        }.ToString();
        _maxPageCountPragma = options.MaxSizeMb is { } mb ? $" PRAGMA max_page_count = {mb * 1024L * 1024L / 4096};" : "";
    }

    public string FilePath { get; }

    /// <summary>What SQLite has reported about the file since start: damage, or a full disk.</summary>
    public StorageHealth Health { get; } = new();

    public string ConnectionString { get; }

    /// <summary>A pooled connection for reading; dispose it after the unit of work.</summary>
    public SqliteConnection Open()
    {
        var folder = System.IO.Path.GetDirectoryName(FilePath);
        if (!string.IsNullOrEmpty(folder))
        {
            Directory.CreateDirectory(folder);
        }
        var connection = new SqliteConnection(ConnectionString);
        connection.Open();
        using var pragma = connection.CreateCommand();
        pragma.CommandText = $"PRAGMA busy_timeout = {_busyTimeoutMs}; PRAGMA synchronous = FULL;{_maxPageCountPragma}";
        pragma.ExecuteNonQuery();
        return connection;
    }

    /// <summary>Runs <paramref name="work"/> as the only writer, in one IMMEDIATE transaction that
    /// commits when it returns and rolls back when it throws.</summary>
    public Task<T> WriteAsync<T>(Func<SqliteConnection, SqliteTransaction, T> work, CancellationToken cancellationToken = default) =>
        WriteAsync(work, foreignKeys: true, cancellationToken);

    /// <summary>As <see cref="WriteAsync{T}(Func{SqliteConnection, SqliteTransaction, T}, CancellationToken)"/>, with foreign
    /// keys off for the transaction, for a migration that rebuilds a parent table (dropping it must not
    /// cascade to its children). Every foreign key is checked before the commit; a dangling one rolls it back.</summary>
    public Task<T> WriteWithoutForeignKeysAsync<T>(Func<SqliteConnection, SqliteTransaction, T> work, CancellationToken cancellationToken = default) =>
        WriteAsync(work, foreignKeys: false, cancellationToken);

    private async Task<T> WriteAsync<T>(Func<SqliteConnection, SqliteTransaction, T> work, bool foreignKeys, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(work);
        await _writeLock.WaitAsync(cancellationToken).ConfigureAwait(false);
        try
        {
            using var connection = Open();
            // The pragma is a no-op inside a transaction, so it is set before BEGIN and set back before the connection returns to the pool.
            if (!foreignKeys)
            {
                SetForeignKeys(connection, on: false);
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
                if (!foreignKeys)
                {
                    SetForeignKeys(connection, on: true);
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

    private static void SetForeignKeys(SqliteConnection connection, bool on)
    {
        using var pragma = connection.CreateCommand();
        pragma.CommandText = $"PRAGMA foreign_keys = {(on ? "ON" : "OFF")};";
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
