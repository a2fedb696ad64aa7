using ForecastHub.Benchmarks;

// Add a verb by implementing IBenchmarkVerb and listing it here.
IBenchmarkVerb[] verbs = [new ForecastVerb(), new FleetVerb(), new ThroughputVerb(), new FitVerb(), new RefitHttpVerb(), new NextDayVerb(), new IngestVerb(), new IngestStagesVerb(), new PostgresFleetVerb(), new PostgresThroughputVerb(), new SeattleVerb(), new AlertSweepVerb()];

var name = args.Length > 0 ? args[0] : string.Empty;
var verb = verbs.FirstOrDefault(v => string.Equals(v.Name, name, StringComparison.OrdinalIgnoreCase));
if (verb is null)
{
    Console.WriteLine("usage: dotnet run -c Release --project tests/ForecastHub.Benchmarks -- VERB");
    foreach (var v in verbs)
    {
        Console.WriteLine($"  {v.Name,-12} {v.Description}");
    }

    return 2;
}

Console.WriteLine($"{verb.Name}: {Environment.ProcessorCount} cores, .NET {Environment.Version}, {(System.Runtime.GCSettings.IsServerGC ? "server" : "workstation")} GC");
return verb.Run(Console.Out);
