using System.Globalization;

namespace ForecastHub.Benchmarks;

/// <summary>CPU time of the calling thread (Linux /proc/thread-self/schedstat): unlike wall time, not inflated by other processes on a shared machine.</summary>
internal static class ThreadCpu
{
    /// <summary>Milliseconds this thread has run on a CPU, or NaN where the file does not exist.</summary>
    public static double Milliseconds()
    {
        const string path = "/proc/thread-self/schedstat";
        if (!File.Exists(path))
        {
            return double.NaN;
        }

        var text = File.ReadAllText(path);
        return long.Parse(text.AsSpan(0, text.IndexOf(' ', StringComparison.Ordinal)), CultureInfo.InvariantCulture) / 1e6;
    }
}
