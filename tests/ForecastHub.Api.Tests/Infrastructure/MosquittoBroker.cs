using System.Diagnostics;
using System.Net.Sockets;
using ForecastHub.TestData;

namespace ForecastHub.Api.Tests.Infrastructure;

/// <summary>Debian's mosquitto on a free loopback port, from a config file of its own; stopped with
/// SIGKILL (a broker lost without goodbye) and startable again on the same port.</summary>
public sealed class MosquittoBroker : IAsyncDisposable
{
    private readonly string folder = Path.Combine(Path.GetTempPath(), "forecasthub-mqtt-" + Guid.NewGuid().ToString("N"));
    private Process? process;

    public int Port { get; } = ChildProcesses.FreeLoopbackPort();

    public string Server => $"127.0.0.1:{Port}";

    public static async Task<MosquittoBroker> StartAsync()
    {
        var broker = new MosquittoBroker();
        Directory.CreateDirectory(broker.folder);
        await File.WriteAllTextAsync(Path.Combine(broker.folder, "mosquitto.conf"),
            $"listener {broker.Port} 127.0.0.1\nallow_anonymous true\npersistence false\n");
        await broker.RestartAsync();
        return broker;
    }

    public async Task RestartAsync()
    {
        var start = new ProcessStartInfo("mosquitto")
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        start.ArgumentList.Add("-c");
        start.ArgumentList.Add(Path.Combine(folder, "mosquitto.conf"));
        process = Process.Start(start)!;
        process.OutputDataReceived += (_, _) => { };
        process.ErrorDataReceived += (_, _) => { };
        process.BeginOutputReadLine();
        process.BeginErrorReadLine();
        var deadline = Stopwatch.StartNew();
        while (true)
        {
            try
            {
                using var probe = new TcpClient();
                await probe.ConnectAsync("127.0.0.1", Port);
                return;
            }
            catch (SocketException) when (deadline.Elapsed < TimeSpan.FromSeconds(30) && !process.HasExited)
            {
                // Polling a real child process until it listens; there is no clock to advance here.
                await Task.Delay(50);
            }
        }
    }

    public async Task StopAsync()
    {
        if (process is not null)
        {
            await ChildProcesses.KillAsync(process);
            process.Dispose();
            process = null;
        }
    }

    public async ValueTask DisposeAsync()
    {
        await StopAsync();
        Directory.Delete(folder, recursive: true);
    }
}
