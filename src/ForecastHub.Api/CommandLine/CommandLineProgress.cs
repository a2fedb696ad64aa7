using System.Diagnostics;
using System.Globalization;

namespace ForecastHub.Api.CommandLine;

/// <summary>
/// One progress line for a long command-line job, redrawn in place on standard error, at most a few
/// times a second; silent when standard error is not a terminal (a pipe, a file, a test's writer),
/// so logs and scripts see only the result.
/// </summary>
public sealed class CommandLineProgress : IDisposable
{
    private static readonly TimeSpan Every = TimeSpan.FromMilliseconds(250);
    private readonly TextWriter? terminal;
    private readonly string label;
    private readonly Stopwatch sinceDrawn = Stopwatch.StartNew();
    private bool drawn;

    private CommandLineProgress(TextWriter? terminal, string label)
    {
        this.terminal = terminal;
        this.label = label;
    }

    /// <summary>Progress on <paramref name="errors"/> only when it is the process's standard error and that is a terminal.</summary>
    public static CommandLineProgress Start(TextWriter errors, string label) =>
        new(ReferenceEquals(errors, Console.Error) && !Console.IsErrorRedirected ? errors : null, label);

    public void Report(long done, long total)
    {
        if (terminal is null || (drawn && sinceDrawn.Elapsed < Every))
        {
            return;
        }
        var percent = total > 0 ? 100.0 * done / total : 0;
        terminal.Write(string.Create(CultureInfo.InvariantCulture, $"\r{label}: {done:N0} of {total:N0} ({percent:0} %)   "));
        terminal.Flush();
        drawn = true;
        sinceDrawn.Restart();
    }

    /// <summary>Clears the line, so the result starts on a clean one.</summary>
    public void Done()
    {
        if (terminal is not null && drawn)
        {
            terminal.Write("\r" + new string(' ', 60) + "\r");
            terminal.Flush();
            drawn = false;
        }
    }

    public void Dispose() => Done();
}
