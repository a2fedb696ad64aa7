using Npgsql;

namespace ForecastHub.Storage.Postgres;

/// <summary>
/// The PostgreSQL errors (SQLSTATE, PostgreSQL 15 manual, appendix A) the service answers as storage
/// trouble rather than a bare 500: no space (53100 disk_full) or memory (53200 out_of_memory) is
/// "storage full", damaged data (XX001 data_corrupted) or index (XX002 index_corrupted) is "storage damaged".
/// </summary>
public static class PostgresErrors
{
    public static bool IsFull(PostgresException error) => error is { SqlState: PostgresErrorCodes.DiskFull or PostgresErrorCodes.OutOfMemory };

    public static bool IsDamage(PostgresException error) => error is { SqlState: PostgresErrorCodes.DataCorrupted or PostgresErrorCodes.IndexCorrupted };

    /// <summary>Records <paramref name="error"/> in <paramref name="health"/> when it is storage trouble.</summary>
    public static void Observe(StorageHealth health, PostgresException error)
    {
        ArgumentNullException.ThrowIfNull(health);
        ArgumentNullException.ThrowIfNull(error);
        if (IsDamage(error))
        {
            health.MarkDamaged($"PostgreSQL error {error.SqlState}: {error.MessageText}");
        }
        else if (IsFull(error))
        {
            health.MarkFull();
        }
    }
}
