using System.Diagnostics;
using System.Net;
using System.Net.Sockets;

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
