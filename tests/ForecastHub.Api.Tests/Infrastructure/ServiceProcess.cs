using System.Diagnostics;
using System.Globalization;
using System.Net;
using System.Net.Http.Headers;
using ForecastHub.TestData;

namespace ForecastHub.Api.Tests.Infrastructure;

/// <summary>The built ForecastHub.Api running as a child process on 127.0.0.1 with a free port, on
/// a given SQLite file or PostgreSQL database: real Kestrel on a port the system gives it, real process death.</summary>
public sealed class ServiceProcess : IAsyncDisposable
{
    private readonly Process _process;

    private ServiceProcess(Process process, Uri baseAddress)
    {
        _process = process;
        BaseAddress = baseAddress;
    }

    public Uri BaseAddress { get; }

    public int Port => BaseAddress.Port;

    public bool HasExited => _process.HasExited;

    public static Task<ServiceProcess> StartAsync(string databasePath, TimeSpan? readyWithin = null, IReadOnlyList<string>? extraArgs = null) =>
        StartAsync(Path.GetDirectoryName(databasePath)!, [$"--Storage:Path={databasePath}", .. extraArgs ?? []], readyWithin);

    /// <summary>A node on the PostgreSQL database of <paramref name="connectionString"/>, with more settings as <c>--Key=value</c> arguments.</summary>
    public static Task<ServiceProcess> StartOnPostgresAsync(string connectionString, params string[] settings) =>
        StartAsync(Path.GetTempPath(), ["--Storage:Provider=postgres", $"--Storage:ConnectionString={connectionString}", .. settings], null);

    private static async Task<ServiceProcess> StartAsync(string workingDirectory, IReadOnlyList<string> settings, TimeSpan? readyWithin)
    {
        var dll = Path.Combine(AppContext.BaseDirectory, "ForecastHub.Api.dll");
        var start = new ProcessStartInfo("dotnet")
        {
            WorkingDirectory = workingDirectory,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        foreach (var arg in new[]
                 {
                     // Port 0: the child binds a port the system gives it and says which one, so no other process can take it first.
                     dll, "--urls", "http://127.0.0.1:0",
                     $"--Auth:AdminKey={ApiFactory.AdminKey}", "--Serilog:MinimumLevel:Default=Warning",
                     "--Serilog:MinimumLevel:Override:Microsoft.Hosting.Lifetime=Information",
                     // These tests push requests as fast as they can; the per-key limit has its own tests.
                     "--RateLimiting:Enabled=false",
                 }.Concat(settings))
        {
            start.ArgumentList.Add(arg);
        }
        start.Environment["ASPNETCORE_ENVIRONMENT"] = "Production";
        var process = Process.Start(start)!;
        var listening = ChildProcesses.WatchListeningAddress(process);
        // Drain the pipes so a chatty child never blocks on a full buffer.
        process.ErrorDataReceived += (_, _) => { };
        process.BeginOutputReadLine();
        process.BeginErrorReadLine();
        var within = readyWithin ?? TimeSpan.FromSeconds(120);
        Uri baseAddress;
        try
        {
            baseAddress = await listening.WaitAsync(within);
        }
        catch (Exception) when (!listening.IsCompletedSuccessfully)
        {
            await ChildProcesses.KillAsync(process);
            var code = process.ExitCode;
            process.Dispose();
            throw new InvalidOperationException($"The service (exit code {code}) did not say where it listens within {within.TotalSeconds.ToString(CultureInfo.InvariantCulture)} s.");
        }

        var service = new ServiceProcess(process, baseAddress);
        await service.AssertReady();
        return service;
    }

    /// <summary>Runs the built service with <paramref name="arguments"/> until it exits by itself
    /// (a start-up that fails, or a command-line verb) and answers its exit code and output.</summary>
    public static async Task<(int ExitCode, string Output, string Error)> RunToExitAsync(IEnumerable<string> arguments, TimeSpan within)
    {
        var start = new ProcessStartInfo("dotnet")
        {
            WorkingDirectory = Path.GetTempPath(),
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        start.ArgumentList.Add(Path.Combine(AppContext.BaseDirectory, "ForecastHub.Api.dll"));
        foreach (var argument in arguments)
        {
            start.ArgumentList.Add(argument);
        }
        start.Environment["ASPNETCORE_ENVIRONMENT"] = "Production";
        using var process = Process.Start(start)!;
        var output = process.StandardOutput.ReadToEndAsync();
        var error = process.StandardError.ReadToEndAsync();
        try
        {
            await process.WaitForExitAsync().WaitAsync(within);
        }
        catch (TimeoutException)
        {
            await ChildProcesses.KillAsync(process);
            throw new TimeoutException($"The service did not exit within {within.TotalSeconds.ToString(CultureInfo.InvariantCulture)} s; output: {await output}");
        }
        return (process.ExitCode, await output, await error);
    }

    public HttpClient CreateAdminClient()
    {
        var client = new HttpClient { BaseAddress = BaseAddress, Timeout = TimeSpan.FromSeconds(60) };
        client.DefaultRequestHeaders.Authorization = new AuthenticationHeaderValue("Bearer", ApiFactory.AdminKey);
        return client;
    }

    /// <summary>SIGKILL: no shutdown code runs.</summary>
    public Task KillAsync() => ChildProcesses.KillAsync(_process);

    public async ValueTask DisposeAsync()
    {
        await KillAsync();
        _process.Dispose();
    }

    /// <summary>Storage and migrations are done before the host listens, so the first answer once it listens is ready.</summary>
    private async Task AssertReady()
    {
        using var client = new HttpClient { BaseAddress = BaseAddress, Timeout = TimeSpan.FromSeconds(60) };
        using var ready = await client.GetAsync(new Uri("health/ready", UriKind.Relative));
        if (ready.StatusCode != HttpStatusCode.OK)
        {
            throw new InvalidOperationException($"The service listens but is not ready: {(int)ready.StatusCode} {await ready.Content.ReadAsStringAsync()}");
        }
    }
}
