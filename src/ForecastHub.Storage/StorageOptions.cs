namespace ForecastHub.Storage;

/// <summary>Configuration section <c>Storage</c>.</summary>
public sealed class StorageOptions
{
    public const string SectionName = "Storage";

    public const string Sqlite = "sqlite";

    public const string Postgres = "postgres";

    /// <summary><c>sqlite</c> (one process, one file) or <c>postgres</c> (several nodes on one PostgreSQL database).</summary>
    public string Provider { get; set; } = Sqlite;

    /// <summary>The SQLite file; its folder is created when missing.</summary>
    public string Path { get; set; } = "data/forecasthub.db";

    /// <summary>How long a connection waits for a lock held by another process before failing.</summary>
    public int BusyTimeoutMs { get; set; } = 30_000;

    /// <summary>A cap on the file's size in MiB (4 KiB pages); a write past it is refused as on a full
    /// disk (507). Null: no cap but the disk's.</summary>
    public int? MaxSizeMb { get; set; }

    /// <summary>The PostgreSQL connection string (Npgsql keywords) when <see cref="Provider"/> is <c>postgres</c>.</summary>
    public string? ConnectionString { get; set; }

    public bool IsPostgres => string.Equals(Provider, Postgres, StringComparison.Ordinal);
}
