using ForecastHub.Storage;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Api.CommandLine;

/// <summary>
/// <c>check-storage FILE</c>: SQLite's full integrity check (every page, every index against its
/// table) on a storage file, without starting the service. Run it with the service stopped or
/// running; it only reads. Exit codes: 0 sound, 3 damaged, 1 the file cannot be opened, 2 bad arguments.
/// </summary>
public static class CheckStorageVerb
{
    public const string Name = "check-storage";
    private const int MaxProblems = 100;

    public static bool IsRequested(IReadOnlyList<string> args) => args is { Count: > 0 } && args[0] == Name;

    public static int Run(IReadOnlyList<string> args, TextWriter output, TextWriter errors)
    {
        ArgumentNullException.ThrowIfNull(args);
        ArgumentNullException.ThrowIfNull(output);
        ArgumentNullException.ThrowIfNull(errors);
        if (args.Count != 2)
        {
            errors.WriteLine($"usage: ForecastHub.Api {Name} FILE   (the SQLite file of Storage:Path)");
            return 2;
        }
        var path = Path.GetFullPath(args[1]);
        if (!File.Exists(path))
        {
            errors.WriteLine($"{path}: no such file.");
            return 1;
        }
        try
        {
            using var database = new SqliteDatabase(new StorageOptions { Path = path });
            var problems = database.Check(quick: false, maxProblems: MaxProblems);
            if (problems.Count == 0)
            {
                output.WriteLine($"{path}: ok (full integrity check)");
                return 0;
            }
            output.WriteLine($"{path}: damaged; SQLite's integrity check reports (first {MaxProblems} at most):");
            foreach (var problem in problems)
            {
                output.WriteLine("  " + problem.ReplaceLineEndings(" "));
            }
            output.WriteLine("Restore the file from a backup; the service refuses to start on it.");
            return 3;
        }
        catch (SqliteException error)
        {
            var message = StorageStartupException.From(path, error).Message;
            if (error.SqliteErrorCode is 11 or 26)
            {
                output.WriteLine(message);
                return 3;
            }
            errors.WriteLine(message);
            return 1;
        }
        finally
        {
            SqliteConnection.ClearAllPools();
        }
    }
}
