using System.Diagnostics;
using Npgsql;

namespace ForecastHub.TestData;

/// <summary>
/// A real PostgreSQL server for tests and benchmarks. With <c>FORECASTHUB_TEST_POSTGRES</c> set (a
/// connection string of a superuser) that server is used; otherwise Debian's PostgreSQL binaries
/// start a private server in a temporary folder on a free loopback port, as the <c>postgres</c>
/// user when running as root, and it is stopped when the process exits. When no server can be
/// started this throws, so the tests that need it fail instead of being skipped.
/// </summary>
public sealed class PostgresServer
{
    public const string EnvironmentVariable = "FORECASTHUB_TEST_POSTGRES";

    private static readonly Lazy<PostgresServer> SharedServer = new(() => Start(durable: false), LazyThreadSafetyMode.ExecutionAndPublication);

    private PostgresServer(string adminConnectionString) => AdminConnectionString = adminConnectionString;

    /// <summary>The one server of this test process. It runs without fsync (tests kill service nodes,
    /// never the database server, so only commit order matters to them, and creating a database per test stays fast).</summary>
    public static PostgresServer Shared => SharedServer.Value;

    public string AdminConnectionString { get; }

    /// <summary>A new empty database, or a copy of the database of <paramref name="template"/> (a connection string); answers its connection string.</summary>
    public async Task<string> CreateDatabaseAsync(string? template = null)
    {
        var name = $"fh_{Guid.NewGuid():N}";
        var from = template is null ? "template0" : new NpgsqlConnectionStringBuilder(template).Database;
        NpgsqlConnection.ClearAllPools();
        await using (var connection = new NpgsqlConnection(AdminConnectionString))
        {
            await connection.OpenAsync();
            await using var create = new NpgsqlCommand($"CREATE DATABASE {name} TEMPLATE {from} ENCODING 'UTF8';", connection);
            await create.ExecuteNonQueryAsync();
        }
        return new NpgsqlConnectionStringBuilder(AdminConnectionString) { Database = name }.ConnectionString;
    }

    /// <summary>Drops a database made by <see cref="CreateDatabaseAsync"/>, closing its pooled connections first.</summary>
    public async Task DropDatabaseAsync(string connectionString)
    {
        var name = new NpgsqlConnectionStringBuilder(connectionString).Database;
        NpgsqlConnection.ClearAllPools();
        await using var connection = new NpgsqlConnection(AdminConnectionString);
        await connection.OpenAsync();
        await using var drop = new NpgsqlCommand($"DROP DATABASE IF EXISTS {name} WITH (FORCE);", connection);
        await drop.ExecuteNonQueryAsync();
    }

    /// <summary>A server of its own with the stock durability settings (fsync on), for benchmarks.</summary>
    public static PostgresServer StartDurable() => Start(durable: true);

    private static PostgresServer Start(bool durable)
    {
        if (Environment.GetEnvironmentVariable(EnvironmentVariable) is { Length: > 0 } given)
        {
            return new PostgresServer(given);
        }

        var bin = FindBinaries();
        var root = Path.Combine(Path.GetTempPath(), $"forecasthub-pg-{Guid.NewGuid():N}");
        var data = Path.Combine(root, "data");
        Directory.CreateDirectory(root);
        var asRoot = Environment.UserName == "root";
        if (asRoot)
        {
            Run("chown", ["postgres", root], asUser: null);
        }
        var user = asRoot ? "postgres" : null;
        Run(Path.Combine(bin, "initdb"), ["-D", data, "-A", "trust", "-U", "postgres", "-E", "UTF8", "--no-sync"], user);
        var port = ChildProcesses.FreeLoopbackPort();
        Run(Path.Combine(bin, "pg_ctl"), ["-D", data, "-w", "-t", "60", "-l", Path.Combine(root, "server.log"),
            "-o", $"-p {port} -k {root} -c listen_addresses=127.0.0.1 -c max_connections=300{(durable ? "" : " -c fsync=off")}", "start"], user);
        AppDomain.CurrentDomain.ProcessExit += (_, _) =>
        {
            try
            {
                Run(Path.Combine(bin, "pg_ctl"), ["-D", data, "-m", "immediate", "stop"], user);
                Directory.Delete(root, recursive: true);
            }
            catch (InvalidOperationException)
            {
                // Best effort at exit: the folder is in the temporary directory.
            }
        };
        return new PostgresServer($"Host=127.0.0.1;Port={port};Username=postgres;Database=postgres;Pooling=true;Maximum Pool Size=50");
    }

    private static string FindBinaries()
    {
        var debian = Directory.Exists("/usr/lib/postgresql")
            ? Directory.GetDirectories("/usr/lib/postgresql").Select(d => Path.Combine(d, "bin")).Where(d => File.Exists(Path.Combine(d, "pg_ctl")))
                .OrderByDescending(d => d, StringComparer.Ordinal).FirstOrDefault()
            : null;
        return debian ?? throw new InvalidOperationException(
            $"PostgreSQL binaries were not found under /usr/lib/postgresql (apt-get install postgresql), and {EnvironmentVariable} is not set.");
    }

    private static void Run(string file, IReadOnlyList<string> arguments, string? asUser)
    {
        var start = asUser is null ? new ProcessStartInfo(file) : new ProcessStartInfo("runuser");
        if (asUser is not null)
        {
            foreach (var a in new[] { "-u", asUser, "--", file })
            {
                start.ArgumentList.Add(a);
            }
        }
        foreach (var a in arguments)
        {
            start.ArgumentList.Add(a);
        }
        start.RedirectStandardOutput = true;
        start.RedirectStandardError = true;
        start.WorkingDirectory = Path.GetTempPath();
        using var process = Process.Start(start) ?? throw new InvalidOperationException($"Could not run {file}.");
        var output = process.StandardOutput.ReadToEndAsync();
        var error = process.StandardError.ReadToEnd();
        process.WaitForExit();
        if (process.ExitCode != 0)
        {
            throw new InvalidOperationException($"{file} {string.Join(' ', arguments)} failed ({process.ExitCode}): {error} {output.Result}");
        }
    }
}
