using System.Diagnostics;
using System.Net;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Storage.Migrations;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Api.Tests.Reliability;

/// <summary>A storage file the service cannot trust stops the start (child process) with exit code 1
/// and one line naming the file and the cause; never a stack trace, never a served request.</summary>
[Trait("Category", "Process")]
public sealed class StartupRefusalTests
{
    private static readonly TimeSpan Patience = TimeSpan.FromSeconds(90);

    [Fact]
    public async Task DatabaseFromANewerBuildIsRefused()
    {
        var path = await StoredDatabaseAsync();
        try
        {
            Execute(path, $"INSERT INTO schema_migrations (version, name, applied_at_ms) VALUES ({Migration.All[^1].Version + 1}, 'from_a_newer_build', 0);");

            var line = await RefusedStartAsync(path);

            Assert.Contains($"schema version is {Migration.All[^1].Version + 1}", line, StringComparison.Ordinal);
            Assert.Contains($"this build knows versions up to {Migration.All[^1].Version}", line, StringComparison.Ordinal);
            Assert.Contains("newer", line, StringComparison.Ordinal);
        }
        finally
        {
            TestFiles.DeleteDatabase(path);
        }
    }

    [Fact]
    public async Task GarbageHeaderIsRefused()
    {
        var path = TestFiles.NewDatabasePath();
        try
        {
            var garbage = new byte[8192];
            new Random(3).NextBytes(garbage);
            await File.WriteAllBytesAsync(path, garbage);

            var line = await RefusedStartAsync(path);

            Assert.Contains("not a SQLite database", line, StringComparison.Ordinal);
        }
        finally
        {
            TestFiles.DeleteDatabase(path);
        }
    }

    [Fact]
    public async Task TruncatedFileIsRefused()
    {
        var path = await StoredDatabaseAsync();
        try
        {
            await using (var file = new FileStream(path, FileMode.Open))
            {
                file.SetLength(file.Length / 2);
            }

            var line = await RefusedStartAsync(path);

            Assert.Contains("damage", line, StringComparison.Ordinal);
        }
        finally
        {
            TestFiles.DeleteDatabase(path);
        }
    }

    [Fact]
    public async Task RandomBytesInTheMiddleOfTheFileAreFoundAtStart()
    {
        var path = await StoredDatabaseAsync();
        try
        {
            Overwrite(path, 16 * 1024, seed: 5);

            var line = await RefusedStartAsync(path);

            Assert.Contains("quick check found damage", line, StringComparison.Ordinal);
            Assert.Contains("check-storage", line, StringComparison.Ordinal);
        }
        finally
        {
            TestFiles.DeleteDatabase(path);
        }
    }

    [Fact]
    public async Task ReadOnlyFolderIsRefused()
    {
        // Tests run as root, whom permission bits do not stop; an immutable folder stops everyone.
        var folder = Path.Combine(Path.GetTempPath(), "forecasthub-tests", $"locked-{Guid.NewGuid():N}");
        Directory.CreateDirectory(folder);
        var path = Path.Combine(folder, "hub.db");
        Assert.Equal(0, await RunAsync("chattr", "+i", folder));
        try
        {
            var line = await RefusedStartAsync(path);

            Assert.Contains("cannot be opened or created", line, StringComparison.Ordinal);
        }
        finally
        {
            await RunAsync("chattr", "-i", folder);
            Directory.Delete(folder, recursive: true);
        }
    }

    /// <summary>Starts the service on <paramref name="path"/>, expects exit code 1 and answers the one line it wrote.</summary>
    private static async Task<string> RefusedStartAsync(string path)
    {
        var (exitCode, output, error) = await ServiceProcess.RunToExitAsync(
            ["--urls", "http://127.0.0.1:0", $"--Storage:Path={path}",
             $"--Auth:AdminKey={ApiFactory.AdminKey}", "--Serilog:MinimumLevel:Default=Warning"],
            Patience);

        Assert.True(exitCode == 1, $"exit code {exitCode}; output: {output} {error}");
        Assert.DoesNotContain("   at ", output + error, StringComparison.Ordinal);
        var lines = (output + error).Split('\n', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);
        var line = Assert.Single(lines, l => l.Contains(path, StringComparison.Ordinal));
        Assert.True(lines.Length == 1, $"more than one line: {output} {error}");
        Assert.Contains(path, line, StringComparison.Ordinal);
        return line;
    }

    /// <summary>A database with a site and 5,000 hourly readings, checkpointed so everything is in the main file.</summary>
    internal static async Task<string> StoredDatabaseAsync()
    {
        var path = TestFiles.NewDatabasePath();
        await using (var factory = new ApiFactory { DatabasePath = path, KeepDatabase = true })
        {
            using var client = factory.CreateAdminClient();
            (await client.CreateSite()).Dispose();
            using var posted = await client.PostReadings(Some.HourlyReadings(5000, ApiFactory.Now.AddDays(-1)));
            Assert.Equal(HttpStatusCode.OK, posted.StatusCode);
        }
        Execute(path, "PRAGMA wal_checkpoint(TRUNCATE);");
        SqliteConnection.ClearAllPools();
        return path;
    }

    /// <summary>Writes <paramref name="bytes"/> random bytes into the middle of the file.</summary>
    internal static void Overwrite(string path, int bytes, int seed)
    {
        var noise = new byte[bytes];
        new Random(seed).NextBytes(noise);
        using var file = new FileStream(path, FileMode.Open, FileAccess.Write);
        file.Position = (file.Length / 2) - (bytes / 2);
        file.Write(noise);
    }

    private static void Execute(string path, string sql)
    {
        using (var connection = new SqliteConnection($"Data Source={path};Pooling=false"))
        {
            connection.Open();
            using var command = connection.CreateCommand();
            command.CommandText = sql;
            command.ExecuteNonQuery();
        }
        SqliteConnection.ClearAllPools();
    }

    private static async Task<int> RunAsync(string program, params string[] arguments)
    {
        using var process = Process.Start(new ProcessStartInfo(program, arguments) { UseShellExecute = false })!;
        await process.WaitForExitAsync();
        return process.ExitCode;
    }
}

/// <summary><c>check-storage FILE</c> as an operator runs it: the full integrity check in a child process.</summary>
[Trait("Category", "Process")]
public sealed class CheckStorageVerbTests
{
    [Fact]
    public async Task SoundFileIsOkAndDamagedFileIsReportedWithExitCode3()
    {
        var path = await StartupRefusalTests.StoredDatabaseAsync();
        try
        {
            var sound = await ServiceProcess.RunToExitAsync(["check-storage", path], TimeSpan.FromSeconds(90));
            StartupRefusalTests.Overwrite(path, 16 * 1024, seed: 5);
            var damaged = await ServiceProcess.RunToExitAsync(["check-storage", path], TimeSpan.FromSeconds(90));

            Assert.Equal(0, sound.ExitCode);
            Assert.Contains($"{path}: ok", sound.Output, StringComparison.Ordinal);
            Assert.True(damaged.ExitCode == 3, damaged.Output + damaged.Error);
            Assert.Contains("damaged", damaged.Output, StringComparison.Ordinal);
            Assert.DoesNotContain("   at ", damaged.Output + damaged.Error, StringComparison.Ordinal);
        }
        finally
        {
            TestFiles.DeleteDatabase(path);
        }
    }
}
