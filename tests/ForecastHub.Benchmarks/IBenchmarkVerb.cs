namespace ForecastHub.Benchmarks;

/// <summary>One benchmark verb: `dotnet run -c Release --project tests/ForecastHub.Benchmarks -- NAME`.</summary>
internal interface IBenchmarkVerb
{
    string Name { get; }

    string Description { get; }

    /// <summary>Runs the benchmark and prints its lines; returns 0 when every target is met, 1 otherwise.</summary>
    int Run(TextWriter output);
}
