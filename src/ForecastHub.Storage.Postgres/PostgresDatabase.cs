using Npgsql;

namespace ForecastHub.Storage.Postgres;

/// <summary>
/// The PostgreSQL database shared by every node: a pooled data source, reads in one snapshot, and
/// writes in one READ COMMITTED transaction each. Every connection runs with
/// <c>synchronous_commit = on</c> whatever the server default, so a write that returned is in the
/// server's write-ahead log on disk before the service answers.
/// </summary>
public sealed class PostgresDatabase : IAsyncDisposable, IDisposable
{
    /// <summary>The channel every node listens on for changes made by any node (see <see cref="Cluster.ChangeNotice"/>).</summary>
    public const string ChangeChannel = "forecasthub_changes";

    private readonly NpgsqlDataSource dataSource;

    public PostgresDatabase(string connectionString)
    {
        ArgumentException.ThrowIfNullOrWhiteSpace(connectionString);
        var builder = new NpgsqlConnectionStringBuilder(connectionString);
        builder.Options = string.Join(' ', new[] { builder.Options, "-c synchronous_commit=on" }.Where(o => !string.IsNullOrWhiteSpace(o)));
        ConnectionString = builder.ConnectionString;
        dataSource = NpgsqlDataSource.Create(ConnectionString);
    }

    /// <summary>Storage trouble the server reported since start (a full disk until a write succeeds; damage until a restart).</summary>
    public StorageHealth Health { get; } = new();

    /// <summary>The connection string as used, with the durability option added.</summary>
    public string ConnectionString { get; }

    public async Task<NpgsqlConnection> OpenAsync(CancellationToken cancellationToken = default) =>
        await dataSource.OpenConnectionAsync(cancellationToken).ConfigureAwait(false);

    /// <summary>Runs <paramref name="work"/> in one transaction that commits when it returns and rolls back when it throws.</summary>
    public async Task<T> WriteAsync<T>(Func<NpgsqlConnection, NpgsqlTransaction, Task<T>> work, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(work);
        try
        {
            await using var connection = await OpenAsync(cancellationToken).ConfigureAwait(false);
            await using var transaction = await connection.BeginTransactionAsync(cancellationToken).ConfigureAwait(false);
            var result = await work(connection, transaction).ConfigureAwait(false);
            await transaction.CommitAsync(cancellationToken).ConfigureAwait(false);
            Health.WriteSucceeded();
            return result;
        }
        catch (PostgresException error)
        {
            PostgresErrors.Observe(Health, error);
            throw;
        }
    }

    /// <summary>Runs <paramref name="read"/> in one REPEATABLE READ, READ ONLY transaction, so it sees one snapshot.</summary>
    public async Task<T> ReadAsync<T>(Func<NpgsqlConnection, NpgsqlTransaction, Task<T>> read, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(read);
        try
        {
            await using var connection = await OpenAsync(cancellationToken).ConfigureAwait(false);
            await using var transaction = await connection.BeginTransactionAsync(System.Data.IsolationLevel.RepeatableRead, cancellationToken).ConfigureAwait(false);
            var result = await read(connection, transaction).ConfigureAwait(false);
            await transaction.CommitAsync(cancellationToken).ConfigureAwait(false);
            return result;
        }
        catch (PostgresException error)
        {
            PostgresErrors.Observe(Health, error);
            throw;
        }
    }

    /// <summary>Runs <paramref name="read"/> on a pooled connection without a transaction (one statement needs none).</summary>
    public async Task<T> QueryAsync<T>(Func<NpgsqlConnection, Task<T>> read, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(read);
        try
        {
            await using var connection = await OpenAsync(cancellationToken).ConfigureAwait(false);
            return await read(connection).ConfigureAwait(false);
        }
        catch (PostgresException error)
        {
            PostgresErrors.Observe(Health, error);
            throw;
        }
    }

    public ValueTask DisposeAsync() => dataSource.DisposeAsync();

    public void Dispose() => dataSource.Dispose();
}

internal static class NpgsqlExtensions
{
    public static NpgsqlCommand Command(this NpgsqlConnection connection, NpgsqlTransaction? transaction, string sql) =>
        new(sql, connection, transaction);

    public static NpgsqlCommand With(this NpgsqlCommand command, object? value)
    {
        command.Parameters.Add(new NpgsqlParameter { Value = value ?? DBNull.Value });
        return command;
    }

    public static NpgsqlCommand With<T>(this NpgsqlCommand command, T value, NpgsqlTypes.NpgsqlDbType type)
    {
        command.Parameters.Add(new NpgsqlParameter<T> { TypedValue = value, NpgsqlDbType = type });
        return command;
    }

    public static double? GetNullableDouble(this NpgsqlDataReader reader, int ordinal) =>
        reader.IsDBNull(ordinal) ? null : reader.GetDouble(ordinal);

    public static string? GetNullableString(this NpgsqlDataReader reader, int ordinal) =>
        reader.IsDBNull(ordinal) ? null : reader.GetString(ordinal);

    public static DateTimeOffset FromUnixMs(long ms) => DateTimeOffset.FromUnixTimeMilliseconds(ms);
}
