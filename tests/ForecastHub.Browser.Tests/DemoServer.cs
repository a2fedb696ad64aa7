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
    private readonly StringBuilder output = new();
    private readonly string folder;

    private DemoServer(Process process, Uri baseAddress, string folder)
    {
        this.process = process;
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
            lock (output)
            {
                return output.ToString();
            }
        }
    }

    public static async Task<DemoServer> StartAsync()
    {
        var folder = Path.Combine(Path.GetTempPath(), "forecasthub-browser-" + Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(folder);
        var port = ChildProcesses.FreeLoopbackPort();
        var start = new ProcessStartInfo("dotnet")
        {
            WorkingDirectory = folder,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        start.ArgumentList.Add(RepoPaths.ApiAssembly);
        start.ArgumentList.Add("--demo");
        start.ArgumentList.Add($"--urls=http://127.0.0.1:{port}");
        start.ArgumentList.Add($"--Storage:Path={Path.Combine(folder, "demo.db")}");
        start.ArgumentList.Add($"--Auth:AdminKey={AdminKey}");
        var process = Process.Start(start) ?? throw new InvalidOperationException("dotnet did not start");
        var server = new DemoServer(process, new Uri($"http://127.0.0.1:{port}/"), folder);
        process.OutputDataReceived += (_, e) => server.Append(e.Data);
        process.ErrorDataReceived += (_, e) => server.Append(e.Data);
        process.BeginOutputReadLine();
        process.BeginErrorReadLine();
        await server.WaitUntilReadyAsync();
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

    private async Task WaitUntilReadyAsync()
    {
        var deadline = DateTime.UtcNow + StartTimeout;
        while (DateTime.UtcNow < deadline)
        {
            if (process.HasExited)
            {
                throw new InvalidOperationException($"the server stopped with code {process.ExitCode}: {Output}");
            }
            try
            {
                using var response = await Client.GetAsync(new Uri("health/ready", UriKind.Relative));
                if (response.IsSuccessStatusCode)
                {
                    return;
                }
            }
            catch (HttpRequestException)
            {
                // Not listening yet.
            }
            await Task.Delay(200);
        }
        throw new TimeoutException($"the server was not ready after {StartTimeout}: {Output}");
    }

    private void Append(string? line)
    {
        if (line is null)
        {
            return;
        }
        lock (output)
        {
            output.AppendLine(line);
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
