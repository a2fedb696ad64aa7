using System.Diagnostics;

namespace ForecastHub.Benchmarks;

/// <summary>Stopwatch harness: warm-up, then batches of calls timed together; reports per-call median and spread, and allocations.</summary>
internal static class Measure
{
    public static Measurement Run(Action action, int batches = 101, int callsPerBatch = 1000, int warmupCalls = 20000)
    {
        for (var i = 0; i < warmupCalls; i++)
        {
            action();
        }

        GC.Collect();
        GC.WaitForPendingFinalizers();
        var perCall = new double[batches];
        var allocatedBefore = GC.GetAllocatedBytesForCurrentThread();
        for (var b = 0; b < batches; b++)
        {
            var start = Stopwatch.GetTimestamp();
            for (var i = 0; i < callsPerBatch; i++)
            {
                action();
            }

            perCall[b] = Stopwatch.GetElapsedTime(start).TotalMicroseconds / callsPerBatch;
        }

        var allocated = (GC.GetAllocatedBytesForCurrentThread() - allocatedBefore) / (double)(batches * callsPerBatch);
        Array.Sort(perCall);
        return new Measurement(
            perCall[batches / 2],
            perCall[batches / 10],
            perCall[batches * 9 / 10],
            allocated,
            batches * callsPerBatch);
    }
}

/// <summary>Per-call times in microseconds (median, 10th and 90th percentile of batch means) and bytes allocated per call.</summary>
internal sealed record Measurement(double MedianMicroseconds, double P10Microseconds, double P90Microseconds, double BytesPerCall, int Calls)
{
    public string Describe() =>
        $"median {MedianMicroseconds:F3} us (p10 {P10Microseconds:F3}, p90 {P90Microseconds:F3}), {BytesPerCall:F0} B allocated per call, {Calls} calls";
}
