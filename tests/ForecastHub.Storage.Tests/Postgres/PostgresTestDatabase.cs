using ForecastHub.Storage.Postgres;
using ForecastHub.Storage.Postgres.Migrations;
using ForecastHub.TestData;
using Npgsql;

namespace ForecastHub.Storage.Tests.Postgres;

/// <summary>A fresh database on the test PostgreSQL server per test, dropped afterwards.</summary>
public sealed class PostgresTestDatabase : IAsyncDisposable
{
    private PostgresTestDatabase(string connectionString)
    {
        ConnectionString = connectionString;
        Database = new PostgresDatabase(connectionString);
    }

    public string ConnectionString { get; }

    public PostgresDatabase Database { get; }

    public static async Task<PostgresTestDatabase> CreateAsync(bool migrated = true)
    {
        var db = new PostgresTestDatabase(await PostgresServer.Shared.CreateDatabaseAsync());
        if (migrated)
        {
            await new PostgresMigrationRunner(db.Database).ApplyAsync();
        }
        return db;
    }

    public async Task<T> ScalarAsync<T>(string sql)
    {
        await using var connection = await Database.OpenAsync();
        await using var command = new NpgsqlCommand(sql, connection);
        return (T)Convert.ChangeType((await command.ExecuteScalarAsync())!, typeof(T), System.Globalization.CultureInfo.InvariantCulture);
    }

    public async ValueTask DisposeAsync()
    {
        await Database.DisposeAsync();
        await PostgresServer.Shared.DropDatabaseAsync(ConnectionString);
    }
}
