using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage;

/// <summary>The storage file cannot be used at start-up; the message is one line naming the file,
/// the cause and what to do, fit to print as it is.</summary>
public sealed class StorageStartupException : Exception
{
    public StorageStartupException()
    {
    }

    public StorageStartupException(string message)
        : base(message)
    {
    }

    public StorageStartupException(string message, Exception innerException)
        : base(message, innerException)
    {
    }

    public StorageStartupException(string path, string cause, Exception? innerException = null)
        : base($"ForecastHub cannot use the storage file {path}: {cause}", innerException)
    {
    }

    /// <summary>The cause of an open or read failure at start-up, in words an operator can act on.</summary>
    public static StorageStartupException From(string path, Exception error)
    {
        ArgumentNullException.ThrowIfNull(error);
        var cause = error switch
        {
            SqliteException { SqliteErrorCode: 26 } =>
                "it is not a SQLite database (a damaged header or another kind of file); restore it from a backup or set Storage:Path to another file.",
            SqliteException { SqliteErrorCode: 11 } =>
                "SQLite reports the file damaged; run 'ForecastHub.Api check-storage' for a full check, then restore it from a backup.",
            SqliteException { SqliteErrorCode: 14 } =>
                "it cannot be opened or created; check that its folder exists and that this user may write there.",
            SqliteException { SqliteErrorCode: 8 } =>
                "it or its folder is read-only for this process; the service needs to write the file and its -wal and -shm files beside it.",
            SqliteException { SqliteErrorCode: 13 } =>
                "the disk is full; free space on it, then start again.",
            SqliteException e => $"SQLite error {e.SqliteErrorCode}: {OneLine(e.Message)}",
            UnauthorizedAccessException => "this user may not create the file or its folder; check the folder's owner and permissions.",
            IOException e => $"the file or its folder cannot be created: {OneLine(e.Message)}",
            _ => OneLine(error.Message),
        };
        return new StorageStartupException(path, cause, error);
    }

    private static string OneLine(string text) => text.ReplaceLineEndings(" ");
}
