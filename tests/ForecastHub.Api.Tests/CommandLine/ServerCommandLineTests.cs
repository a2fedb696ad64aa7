using System.Diagnostics;
using ForecastHub.Api.CommandLine;
using ForecastHub.TestData;

namespace ForecastHub.Api.Tests.CommandLine;

/// <summary>The built service run as a child process in an empty folder: help and bad arguments end
/// the process at once, and no database file or data folder appears.</summary>
public sealed class ServerCommandLineTests : IDisposable
{
    private readonly string folder = Path.Combine(Path.GetTempPath(), "forecasthub-args-" + Guid.NewGuid().ToString("N"));

    public ServerCommandLineTests() => Directory.CreateDirectory(folder);

    public void Dispose() => Directory.Delete(folder, recursive: true);

    internal static async Task<(int Code, string Output, string Errors)> RunService(string workingDirectory, params string[] args)
    {
        var start = new ProcessStartInfo("dotnet")
        {
            WorkingDirectory = workingDirectory,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        start.ArgumentList.Add(Path.Combine(AppContext.BaseDirectory, "ForecastHub.Api.dll"));
        foreach (var arg in args)
        {
            start.ArgumentList.Add(arg);
        }
        start.Environment["ASPNETCORE_ENVIRONMENT"] = "Production";
        using var process = Process.Start(start)!;
        var output = process.StandardOutput.ReadToEndAsync();
        var errors = process.StandardError.ReadToEndAsync();
        // A process that started a server would never exit: give up after a generous bound and fail.
        using var timeout = new CancellationTokenSource(TimeSpan.FromSeconds(60));
        try
        {
            await process.WaitForExitAsync(timeout.Token);
        }
        catch (OperationCanceledException)
        {
            await ChildProcesses.KillAsync(process);
            Assert.Fail($"'{string.Join(' ', args)}' did not exit: it started something.");
        }
        return (process.ExitCode, await output, await errors);
    }

    [Theory]
    [InlineData("--help")]
    [InlineData("-h")]
    [InlineData("help")]
    public async Task HelpPrintsTheVerbsAndStartsNothing(string flag)
    {
        var (code, output, _) = await RunService(folder, flag);

        Assert.Equal(0, code);
        Assert.Contains("fit FILE.csv", output, StringComparison.Ordinal);
        Assert.Contains("import FILE.csv", output, StringComparison.Ordinal);
        Assert.Empty(Directory.EnumerateFileSystemEntries(folder));
    }

    [Theory]
    [InlineData("unknown verb 'frobnicate'", "frobnicate")]
    [InlineData("unknown option '--bogus'", "--bogus")]
    [InlineData("unknown option '-x'", "-x")]
    [InlineData("needs a value", "--Storage:Path")]
    [InlineData("needs a value", "--urls", "http://127.0.0.1:1", "--Storage:Path")]
    public async Task BadArgumentsAreRefusedWithAReasonAndStartNothing(string expected, params string[] args)
    {
        var (code, output, errors) = await RunService(folder, args);

        Assert.Equal(2, code);
        Assert.Contains(expected, errors, StringComparison.Ordinal);
        Assert.Contains("--help", errors, StringComparison.Ordinal);
        Assert.Equal("", output);
        Assert.Empty(Directory.EnumerateFileSystemEntries(folder));
    }

    [Fact]
    public void TheArgumentsTheServiceIsStartedWithPassTheCheck()
    {
        Assert.Null(ServerCommandLine.Check([]));
        Assert.Null(ServerCommandLine.Check(["--demo", "--urls=http://127.0.0.1:5000", "--Storage:Path=/srv/hub.db"]));
        Assert.Null(ServerCommandLine.Check(["--urls", "http://127.0.0.1:5000", "--Storage:Path", "/srv/hub.db", "Auth:AllowAnonymousRead=true"]));
        Assert.Null(ServerCommandLine.Check(["--Storage=", "--Storage:Path=/tmp/x.db", "--contentRoot=/app", "--environment=Development", "--applicationName=ForecastHub.Api"]));
    }
}
