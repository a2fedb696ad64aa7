using System.Runtime.InteropServices;
using SQLitePCL;

namespace ForecastHub.Storage.Readings;

/// <summary>
/// SQLite's step and column calls made straight into the bundled <c>e_sqlite3</c> library on a statement's native
/// pointer. A refit reads about a hundred thousand rows, four calls each, and every call through SQLitePCL's safe
/// handle pays a reference count up and down: 21 ms for ten years of rows that take 14 ms this way.
/// </summary>
internal static partial class SqliteRowCalls
{
    private const string Library = "e_sqlite3";

    /// <summary>Whether statements come from the bundled library, so their pointers may be passed here (another
    /// SQLitePCL provider would hand out pointers of a different SQLite). Ask once a connection is open.</summary>
    public static bool Available => raw.GetNativeLibraryName() == Library;

    /// <summary>sqlite3_step: it may read the file, so the runtime is told, as for any call that can block.</summary>
    [LibraryImport(Library, EntryPoint = "sqlite3_step")]
    public static partial int Step(IntPtr statement);

    // A column read copies a value out of the current row: no I/O, no lock held for long.
    [LibraryImport(Library, EntryPoint = "sqlite3_column_int64")]
    [SuppressGCTransition]
    public static partial long Int64(IntPtr statement, int column);

    [LibraryImport(Library, EntryPoint = "sqlite3_column_double")]
    [SuppressGCTransition]
    public static partial double Double(IntPtr statement, int column);
}
