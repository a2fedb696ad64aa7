using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage.Tests;

/// <summary>A fresh SQLite file per test, deleted afterwards (pools cleared first).</summary>
public sealed class TestDatabase : IDisposable
{
    public TestDatabase()
    {
        var folder = System.IO.Path.Combine(System.IO.Path.GetTempPath(), "forecasthub-tests");
        Directory.CreateDirectory(folder);
        Path = System.IO.Path.Combine(folder, $"{Guid.NewGuid():N}.db");
        Database = new SqliteDatabase(new StorageOptions { Path = Path });
    }

    public string Path { get; }

    public SqliteDatabase Database { get; }

    public T Scalar<T>(string sql)
    {
        using var connection = Database.Open();
        using var command = connection.CreateCommand();
        command.CommandText = sql;
        return (T)Convert.ChangeType(command.ExecuteScalar()!, typeof(T), System.Globalization.CultureInfo.InvariantCulture);
    }

    public void Execute(string sql)
    {
        using var connection = Database.Open();
        using var command = connection.CreateCommand();
        command.CommandText = sql;
        command.ExecuteNonQuery();
    }

    public void Dispose()
    {
        Database.Dispose();
        SqliteConnection.ClearAllPools();
        foreach (var file in new[] { Path, Path + "-wal", Path + "-shm" })
        {
            File.Delete(file);
        }
    }
}
