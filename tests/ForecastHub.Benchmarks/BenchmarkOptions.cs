using System.Globalization;

namespace ForecastHub.Benchmarks;

/// <summary>Sizes of the service benchmarks; the defaults are the targets' sizes, environment variables shrink them for a quick look.</summary>
internal sealed record BenchmarkOptions(int Sites, int Days, int Seconds)
{
    public static BenchmarkOptions FromEnvironment() => new(
        Value("FORECASTHUB_BENCH_SITES", 1000),
        Value("FORECASTHUB_BENCH_DAYS", 365),
        Value("FORECASTHUB_BENCH_SECONDS", 10));

    private static int Value(string name, int fallback) =>
        int.TryParse(Environment.GetEnvironmentVariable(name), NumberStyles.None, CultureInfo.InvariantCulture, out var v) && v > 0 ? v : fallback;
}

/// <summary>Fleet refit from scratch, peak RSS and cold start to ready, against the API as a child process.</summary>
internal sealed class FleetVerb : IBenchmarkVerb
{
    public string Name => "fleet";

    public string Description => "1,000 sites x 1 year hourly: refit from scratch (<= 60 s, peak RSS <= 400 MiB), cold start to ready (<= 3 s)";

    public int Run(TextWriter output) => FleetBenchmark.RunAsync(BenchmarkOptions.FromEnvironment(), output).GetAwaiter().GetResult();
}

/// <summary>wrk against the forecast endpoint and liveness on one server.</summary>
internal sealed class ThroughputVerb : IBenchmarkVerb
{
    public string Name => "throughput";

    public string Description => "wrk: 48-step two-level forecast vs /health/live on one server (>= 0.5 x liveness, p99 <= 20 ms)";

    public int Run(TextWriter output) => ForecastThroughputBenchmark.RunAsync(BenchmarkOptions.FromEnvironment(), output).GetAwaiter().GetResult();
}
