using System.Diagnostics;
using System.Net;
using System.Text;
using ForecastHub.TestData;

namespace ForecastHub.Browser.Tests;

/// <summary>
/// The real executable started as a child process with <c>--demo</c>: real Kestrel on a loopback
/// port, its own SQLite file in a fresh folder, the demo scenario loaded.
/// </summary>
internal sealed class DemoServer : IAsyncDisposable
{
    /// <summary>The admin key the demo server is started with, for tests that change settings from the page.</summary>
    public const string AdminKey = "browser-test-admin-key-5d1e0c7a9b3f";

    private static readonly TimeSpan StartTimeout = TimeSpan.FromSeconds(90);
    private readonly Process process;
    private readonly StringBuilder output;
    private readonly string folder;

    private DemoServer(Process process, StringBuilder output, Uri baseAddress, string folder)
    {
        this.process = process;
        this.output = output;
        this.folder = folder;
        BaseAddress = baseAddress;
        Client = new HttpClient { BaseAddress = baseAddress, Timeout = TimeSpan.FromSeconds(30) };
    }

    public Uri BaseAddress { get; }

    public HttpClient Client { get; }

    /// <summary>Everything the server printed, for failure messages.</summary>
    public string Output
    {
        get
        {
            return Text(output);
        }
    }

    public static async Task<DemoServer> StartAsync()
    {
        var folder = Path.Combine(Path.GetTempPath(), "forecasthub-browser-" + Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(folder);
        var start = new ProcessStartInfo("dotnet")
        {
            WorkingDirectory = folder,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        start.ArgumentList.Add(RepoPaths.ApiAssembly);
        start.ArgumentList.Add("--demo");
        // Port 0: the server binds a port the system gives it and says which one, so no other process can take it first.
        start.ArgumentList.Add("--urls=http://127.0.0.1:0");
        start.ArgumentList.Add($"--Storage:Path={Path.Combine(folder, "demo.db")}");
        start.ArgumentList.Add($"--Auth:AdminKey={AdminKey}");
        var process = Process.Start(start) ?? throw new InvalidOperationException("dotnet did not start");
        var printed = new StringBuilder();
        var listening = ChildProcesses.WatchListeningAddress(process);
        process.OutputDataReceived += (_, e) => Append(printed, e.Data);
        process.ErrorDataReceived += (_, e) => Append(printed, e.Data);
        process.BeginOutputReadLine();
        process.BeginErrorReadLine();
        Uri address;
        try
        {
            address = await listening.WaitAsync(StartTimeout);
        }
        catch (Exception error) when (error is TimeoutException or InvalidOperationException)
        {
            await ChildProcesses.KillAsync(process);
            process.Dispose();
            throw new InvalidOperationException($"the demo server did not say where it listens within {StartTimeout}: {Text(printed)}", error);
        }

        var server = new DemoServer(process, printed, address, folder);
        await server.AssertReadyAsync();
        return server;
    }

    /// <summary>Waits until every site that has enough data has a fitted model, so the page shows them.</summary>
    public async Task WaitForModelsAsync(IEnumerable<string> siteIds)
    {
        var deadline = DateTime.UtcNow + StartTimeout;
        foreach (var id in siteIds)
        {
            while (true)
            {
                using var response = await Client.GetAsync(new Uri($"api/v1/sites/{id}/model", UriKind.Relative));
                if (response.StatusCode == HttpStatusCode.OK)
                {
                    break;
                }
                if (DateTime.UtcNow > deadline)
                {
                    throw new TimeoutException($"no model for {id} after {StartTimeout}: {Output}");
                }
                await Task.Delay(250);
            }
        }
    }

    /// <summary>Storage, migrations and the demo scenario are loaded before the host listens, so the first answer once it listens is ready.</summary>
    private async Task AssertReadyAsync()
    {
        using var response = await Client.GetAsync(new Uri("health/ready", UriKind.Relative));
        if (!response.IsSuccessStatusCode)
        {
            throw new InvalidOperationException($"the demo server listens but is not ready ({(int)response.StatusCode}): {Output}");
        }
    }

    private static void Append(StringBuilder printed, string? line)
    {
        if (line is null)
        {
            return;
        }
        lock (printed)
        {
            printed.AppendLine(line);
        }
    }

    private static string Text(StringBuilder printed)
    {
        lock (printed)
        {
            return printed.ToString();
        }
    }

    public async ValueTask DisposeAsync()
    {
        Client.Dispose();
        await ChildProcesses.KillAsync(process);
        process.Dispose();
        try
        {
            Directory.Delete(folder, recursive: true);
        }
        catch (IOException)
        {
            // A file still held open only leaves a temp folder behind.
        }
    }
}
