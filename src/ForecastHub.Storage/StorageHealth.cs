using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage;

/// <summary>
/// The storage trouble the database has reported since start, for readiness and for the answer a request
/// gets. Damage (SQLite: SQLITE_CORRUPT, SQLITE_NOTADB; PostgreSQL: see <c>PostgresErrors</c>) stays until a
/// restart, whose start-up check then refuses a damaged SQLite file; a full disk lasts until a write succeeds again.
/// </summary>
public sealed class StorageHealth
{
    public const int Corrupt = 11;
    public const int Full = 13;
    public const int NotADatabase = 26;

    private volatile string? damage;
    private volatile bool full;

    /// <summary>What SQLite said when it found damage, or null.</summary>
    public string? Damage => damage;

    public bool IsFull => full;

    public static bool IsDamage(SqliteException error) =>
        error is { SqliteErrorCode: Corrupt or NotADatabase };

    public static bool IsFullDisk(SqliteException error) => error is { SqliteErrorCode: Full };

    public void Observe(SqliteException error)
    {
        ArgumentNullException.ThrowIfNull(error);
        if (IsDamage(error))
        {
            MarkDamaged($"SQLite error {error.SqliteErrorCode}: {error.Message}");
        }
        else if (IsFullDisk(error))
        {
            MarkFull();
        }
    }

    /// <summary>Records the first damage the database reported, in its own words.</summary>
    public void MarkDamaged(string what)
    {
        ArgumentNullException.ThrowIfNull(what);
        damage ??= what.ReplaceLineEndings(" ");
    }

    public void MarkFull() => full = true;

    public void WriteSucceeded() => full = false;
}
