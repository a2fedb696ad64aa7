using System.Diagnostics;
using System.Globalization;
using System.Net;
using System.Net.Http.Headers;
using ForecastHub.TestData;

namespace ForecastHub.Benchmarks;

/// <summary>The API built in Release and run as a child process on a loopback port against one SQLite file.</summary>
internal sealed class ServerProcess : IAsyncDisposable
{
    public const string AdminKey = "benchmark-admin-key-0123456789abcdef";

    private readonly Process process;

    private ServerProcess(Process process, Uri baseAddress)
    {
        this.process = process;
        BaseAddress = baseAddress;
        Client = new HttpClient { BaseAddress = baseAddress, Timeout = TimeSpan.FromSeconds(100) };
        Client.DefaultRequestHeaders.Authorization = new AuthenticationHeaderValue("Bearer", AdminKey);
    }

    public Uri BaseAddress { get; }

    public HttpClient Client { get; }

    public int Pid => process.Id;

    public static string RepoRoot()
    {
        var dir = new DirectoryInfo(AppContext.BaseDirectory);
        while (dir is not null && !File.Exists(Path.Combine(dir.FullName, "ForecastHub.sln")))
        {
            dir = dir.Parent;
        }

        return dir?.FullName ?? throw new InvalidOperationException("ForecastHub.sln not found above the benchmark's folder.");
    }

    /// <summary>Builds the API in Release once per run.</summary>
    public static string BuildApi()
    {
        var root = RepoRoot();
        Run("dotnet", $"build \"{Path.Combine(root, "src", "ForecastHub.Api")}\" -c Release -nologo -v q", root);
        return Path.Combine(root, "src", "ForecastHub.Api", "bin", "Release", "net10.0", "ForecastHub.Api.dll");
    }

    public static ServerProcess Start(string apiDll, string databasePath, params string[] extraArgs)
    {
        var port = ChildProcesses.FreeLoopbackPort();
        var info = new ProcessStartInfo("dotnet")
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
            WorkingDirectory = Path.GetDirectoryName(apiDll)!,
        };
        info.ArgumentList.Add(apiDll);
        info.ArgumentList.Add($"--urls=http://127.0.0.1:{port}");
        info.ArgumentList.Add($"--Storage:Path={databasePath}");
        info.ArgumentList.Add($"--Auth:AdminKey={AdminKey}");
        info.ArgumentList.Add("--Serilog:MinimumLevel:Default=Warning");
        foreach (var arg in extraArgs)
        {
            info.ArgumentList.Add(arg);
        }

        var process = Process.Start(info)!;

        // Drain the logs so the child never blocks on a full pipe.
        process.OutputDataReceived += (_, _) => { };
        process.ErrorDataReceived += (_, e) => { if (e.Data is not null) { Console.Error.WriteLine("  server: " + e.Data); } };
        process.BeginOutputReadLine();
        process.BeginErrorReadLine();
        return new ServerProcess(process, new Uri($"http://127.0.0.1:{port}"));
    }

    /// <summary>Polls /health/ready until it answers 200; answers the time from <paramref name="since"/>.</summary>
    public async Task<TimeSpan> WaitReadyAsync(Stopwatch since, TimeSpan limit)
    {
        using var probe = new HttpClient { BaseAddress = BaseAddress, Timeout = TimeSpan.FromSeconds(2) };
        while (since.Elapsed < limit)
        {
            if (process.HasExited)
            {
                throw new InvalidOperationException($"The server exited with code {process.ExitCode}.");
            }

            try
            {
                using var response = await probe.GetAsync(new Uri("/health/ready", UriKind.Relative));
                if (response.StatusCode == HttpStatusCode.OK)
                {
                    return since.Elapsed;
                }
            }
            catch (Exception e) when (e is HttpRequestException or TaskCanceledException)
            {
                // Not listening yet, or too busy starting to answer within the probe's timeout.
            }

            await Task.Delay(10);
        }

        throw new TimeoutException("The server did not become ready in time.");
    }

    /// <summary>Peak resident set size of the server so far, in MiB (VmHWM).</summary>
    public double PeakRssMiB()
    {
        var line = File.ReadLines($"/proc/{process.Id}/status").First(l => l.StartsWith("VmHWM:", StringComparison.Ordinal));
        var kb = double.Parse(line.Split(' ', StringSplitOptions.RemoveEmptyEntries)[1], CultureInfo.InvariantCulture);
        return kb / 1024;
    }

    /// <summary>Waits until the process used at most <paramref name="quietCpuSeconds"/> of CPU in one <paramref name="period"/>
    /// (at most <paramref name="limit"/>): the work set off by what came before is done.</summary>
    public static async Task WaitUntilIdleAsync(int pid, TimeSpan period, double quietCpuSeconds, TimeSpan limit)
    {
        var waited = Stopwatch.StartNew();
        for (var before = CpuSeconds(pid); waited.Elapsed < limit;)
        {
            await Task.Delay(period).ConfigureAwait(false);
            var now = CpuSeconds(pid);
            if (now - before <= quietCpuSeconds)
            {
                return;
            }

            before = now;
        }
    }

    /// <summary>utime + stime of a process (fields 14 and 15 of /proc/PID/stat), in seconds (USER_HZ is 100 on Linux).</summary>
    public static double CpuSeconds(int pid)
    {
        var stat = File.ReadAllText($"/proc/{pid}/stat");
        var fields = stat[(stat.LastIndexOf(')') + 2)..].Split(' ');
        return (long.Parse(fields[11], CultureInfo.InvariantCulture) + long.Parse(fields[12], CultureInfo.InvariantCulture)) / 100.0;
    }

    public static string Run(string file, string arguments, string workingDirectory)
    {
        var info = new ProcessStartInfo(file, arguments)
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
            WorkingDirectory = workingDirectory,
        };
        using var process = Process.Start(info)!;
        var stdout = process.StandardOutput.ReadToEndAsync();
        var stderr = process.StandardError.ReadToEndAsync();
        process.WaitForExit();
        if (process.ExitCode != 0)
        {
            throw new InvalidOperationException($"{file} {arguments} failed ({process.ExitCode}): {stdout.Result}{stderr.Result}");
        }

        return stdout.Result;
    }

    public async ValueTask DisposeAsync()
    {
        Client.Dispose();
        await ChildProcesses.KillAsync(process);
        process.Dispose();
    }
}
