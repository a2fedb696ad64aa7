using System.Diagnostics;
using System.Net;
using System.Net.Sockets;
using System.Text.Json;

namespace ForecastHub.TestData;

/// <summary>What every test and benchmark that runs the service as a child process needs: a free
/// loopback port, and a hard stop (SIGKILL of the whole tree, so no shutdown code runs).</summary>
public static class ChildProcesses
{
    public static int FreeLoopbackPort()
    {
        using var listener = new TcpListener(IPAddress.Loopback, 0);
        listener.Start();
        return ((IPEndPoint)listener.LocalEndpoint).Port;
    }

    /// <summary>
    /// Watches a child service's standard output (call before <c>BeginOutputReadLine</c>) for the host's
    /// "Now listening on" line of its JSON console log. A service started on port 0 reports the port it
    /// was given there, so no other process can take the port between choosing it and binding it.
    /// </summary>
    public static Task<Uri> WatchListeningAddress(Process process)
    {
        ArgumentNullException.ThrowIfNull(process);
        var listening = new TaskCompletionSource<Uri>(TaskCreationOptions.RunContinuationsAsynchronously);
        process.OutputDataReceived += (_, e) =>
        {
            if (e.Data is null)
            {
                listening.TrySetException(new InvalidOperationException("The service closed its output (it exited) before it said where it listens."));
            }
            else if (ListeningAddress(e.Data) is { } address)
            {
                listening.TrySetResult(address);
            }
        };
        return listening.Task;
    }

    /// <summary>The address of a "Now listening on" log line (with a trailing slash), or null for any other line.</summary>
    public static Uri? ListeningAddress(string line)
    {
        ArgumentNullException.ThrowIfNull(line);
        if (!line.Contains("Now listening on", StringComparison.Ordinal))
        {
            return null;
        }

        try
        {
            using var entry = JsonDocument.Parse(line);
            return entry.RootElement.TryGetProperty("address", out var address) && address.ValueKind == JsonValueKind.String
                && Uri.TryCreate(address.GetString()!.TrimEnd('/') + "/", UriKind.Absolute, out var uri) ? uri : null;
        }
        catch (JsonException)
        {
            return null;
        }
    }

    public static async Task KillAsync(Process process)
    {
        ArgumentNullException.ThrowIfNull(process);
        if (!process.HasExited)
        {
            process.Kill(entireProcessTree: true);
        }

        await process.WaitForExitAsync();
    }
}
