using System.Globalization;
using System.Text.Json;
using ForecastHub.Core.Verification;

namespace ForecastHub.Benchmarks;

/// <summary>
/// Day-ahead skill on real data: Seattle daily max and min (NOAA via vega-datasets 3.2.1) played day by
/// day through the service's HTTP API (<see cref="ApiReplay"/>), scored beside R's auto.arima with
/// Fourier terms and persistence from the committed fixture (tests/reference/seattle-peer-fixtures.R).
/// FORECASTHUB_BENCH_YEAR picks the year (default 2015, the test year; 2014 is the year settings are
/// chosen on, trained on 2012-2013); FORECASTHUB_BENCH_OUT names a folder for the per-day forecasts (CSV). Targets (2015): MAE below the peer's on both series with the
/// bootstrap interval of the difference below zero, pooled coverage 95 % in 0.935-0.965 and 80 % in
/// 0.77-0.83, frost Brier score below the peer's.
/// </summary>
internal sealed class SeattleVerb : IBenchmarkVerb
{
    private static readonly double[] Probabilities = [0.025, 0.05, 0.1, 0.15, 0.25, 0.35, 0.45, 0.55, 0.65, 0.75, 0.85, 0.9, 0.95, 0.975];

    public string Name => "seattle";

    public string Description => "Seattle day by day through the API against R auto.arima + Fourier (fixture)";

    public int Run(TextWriter output) => RunAsync(output).GetAwaiter().GetResult();

    private static async Task<int> RunAsync(TextWriter output)
    {
        var year = int.Parse(Environment.GetEnvironmentVariable("FORECASTHUB_BENCH_YEAR") ?? "2015", CultureInfo.InvariantCulture);
        var fixtures = Path.Combine(ServerProcess.RepoRoot(), "tests", "ForecastHub.Core.Tests", "Fixtures");
        var rows = File.ReadAllLines(Path.Combine(fixtures, "seattle-weather.csv")).Skip(1).Select(l => l.Split(',')).ToArray();
        var dates = rows.Select(r => DateOnly.Parse(r[0], CultureInfo.InvariantCulture)).ToArray();
        var max = rows.Select(r => double.Parse(r[1], CultureInfo.InvariantCulture)).ToArray();
        var min = rows.Select(r => double.Parse(r[2], CultureInfo.InvariantCulture)).ToArray();
        using var peerDocument = JsonDocument.Parse(File.ReadAllText(Path.Combine(fixtures, $"seattle-peer-{year}.json")));
        var peer = peerDocument.RootElement;
        var targetDates = peer.GetProperty("dates").EnumerateArray().Select(d => DateOnly.Parse(d.GetString()!, CultureInfo.InvariantCulture)).ToArray();
        var (first, last) = (targetDates[0], targetDates[^1]);
        var known = dates.Select((d, i) => (d, i)).Where(x => x.d <= last).Select(x => x.i).ToArray();

        output.WriteLine($"Seattle {year}, {targetDates.Length} days, one day ahead through the HTTP API (default settings); peer: {peer.GetProperty("source").GetString()}");
        var watch = System.Diagnostics.Stopwatch.StartNew();
        var replay = await ApiReplay.RunAsync(
            [
                new ApiReplay.SeriesInput("seattle-max", "max", [.. known.Select(i => dates[i])], [.. known.Select(i => max[i])]),
                new ApiReplay.SeriesInput("seattle-min", "min", [.. known.Select(i => dates[i])], [.. known.Select(i => min[i])]),
            ],
            first,
            last,
            output);
        output.WriteLine($"replay took {watch.Elapsed.TotalSeconds:F0} s");

        var met = true;
        var pooled = new List<(double C80, double C95, int N)>();
        foreach (var series in peer.GetProperty("series").EnumerateArray())
        {
            var name = series.GetProperty("name").GetString()!;
            var observed = Doubles(series, "observed");
            var ours = replay.Forecasts[$"seattle-{name}"];
            var theirs = PeerForecasts(series);
            var persistence = PersistenceForecasts(series);
            var scores = new[] { ours, theirs, persistence }.Select(f => (f.Method, Score: DayAheadScore.Of(f, observed, 0))).ToArray();
            var frostDays = observed.Count(v => v < 0);
            output.WriteLine();
            output.WriteLine($"temp_{name}: {observed.Length} days, {frostDays} below 0 C; ours refitted {replay.Refits[$"seattle-{name}"]} times ({replay.Orders[$"seattle-{name}"]}); peer {string.Join(", ", series.GetProperty("order").EnumerateArray().Select(o => o.GetString()).GroupBy(o => o).Select(g => $"{g.Key} x{g.Count()}"))}");
            output.WriteLine("| method | MAE | RMSE | CRPS | 80 % coverage | 95 % coverage | Brier P(< 0 C) |");
            output.WriteLine("| --- | --- | --- | --- | --- | --- | --- |");
            foreach (var (method, s) in scores)
            {
                output.WriteLine(Invariant($"| {method} | {s.Mae:F3} | {s.Rmse:F3} | {s.Crps:F3} | {s.Coverage80:F3} | {s.Coverage95:F3} | {s.Brier:F4} |"));
            }

            var absolute = PairedDifference.Of(AbsoluteErrors(ours, observed), AbsoluteErrors(theirs, observed));
            var crps = PairedDifference.Of(Crps(ours, observed), Crps(theirs, observed));
            var brier = PairedDifference.Of(Brier(ours, observed), Brier(theirs, observed));
            output.WriteLine(Invariant($"ours - peer, mean over days [95 % block-bootstrap interval] (paired t): absolute error {absolute.Mean:F3} [{absolute.Lower95:F3}, {absolute.Upper95:F3}] (t {absolute.T:F2}); CRPS {crps.Mean:F3} [{crps.Lower95:F3}, {crps.Upper95:F3}] (t {crps.T:F2}); Brier {brier.Mean:F4} [{brier.Lower95:F4}, {brier.Upper95:F4}]"));
            var gaussianCrps = Enumerable.Range(0, observed.Length).Average(i => Scores.CrpsGaussian(theirs.Mean[i], Doubles(series, "sd")[i], observed[i]));
            output.WriteLine(Invariant($"(peer CRPS in closed form {gaussianCrps:F4}; the quantile integral above differs by {Math.Abs(gaussianCrps - scores[1].Score.Crps):G2})"));

            var maeMet = absolute.Upper95 < 0;
            output.WriteLine($"target MAE below the peer's, interval below zero: {(maeMet ? "met" : "NOT met")}");
            met &= maeMet;
            if (name == "min")
            {
                var brierMet = scores[0].Score.Brier < scores[1].Score.Brier;
                output.WriteLine($"target frost Brier below the peer's: {(brierMet ? "met" : "NOT met")}");
                met &= brierMet;
            }

            pooled.Add((scores[0].Score.Coverage80, scores[0].Score.Coverage95, observed.Length));
            if (Environment.GetEnvironmentVariable("FORECASTHUB_BENCH_OUT") is { Length: > 0 } folder)
            {
                var path = Path.Combine(folder, $"seattle-{year}-{name}.csv");
                File.WriteAllLines(path, [
                    "date,observed,mean,lower80,upper80,lower95,upper95,pBelow0,peerMean,peerSd,peerPBelow0",
                    .. targetDates.Select((d, i) => Invariant(
                        $"{d:yyyy-MM-dd},{observed[i]},{ours.Mean[i]:F4},{ours.Lower80[i]:F4},{ours.Upper80[i]:F4},{ours.Lower95[i]:F4},{ours.Upper95[i]:F4},{ours.Distribution[i].ProbabilityBelow(0):F5},{theirs.Mean[i]:F4},{Doubles(series, "sd")[i]:F4},{theirs.Distribution[i].ProbabilityBelow(0):F5}")),
                ]);
                output.WriteLine($"per-day forecasts written to {path}");
            }
        }

        var n = pooled.Sum(p => p.N);
        var c80 = pooled.Sum(p => p.C80 * p.N) / n;
        var c95 = pooled.Sum(p => p.C95 * p.N) / n;
        var coverageMet = c80 is >= 0.77 and <= 0.83 && c95 is >= 0.935 and <= 0.965;
        output.WriteLine();
        output.WriteLine(Invariant($"pooled coverage (ours): 80 % {c80:F3}, 95 % {c95:F3}; target 0.77-0.83 and 0.935-0.965: {(coverageMet ? "met" : "NOT met")}"));
        return met && coverageMet ? 0 : 1;
    }

    private static DayAheadForecasts PeerForecasts(JsonElement series)
    {
        var mean = Doubles(series, "mean");
        var sd = Doubles(series, "sd");
        return new DayAheadForecasts(
            "R auto.arima + Fourier K = 2",
            mean,
            Doubles(series, "lower80"),
            Doubles(series, "upper80"),
            Doubles(series, "lower95"),
            Doubles(series, "upper95"),
            [.. mean.Select((m, i) => PredictiveQuantiles.Gaussian(m, sd[i], Probabilities))]);
    }

    private static DayAheadForecasts PersistenceForecasts(JsonElement series)
    {
        var mean = Doubles(series, "persistence");
        var sd = Doubles(series, "persistenceSd");
        double[] Bound(double z) => [.. mean.Select((m, i) => m + z * sd[i])];
        return new DayAheadForecasts(
            "persistence (Gaussian, sd of daily changes)",
            mean,
            Bound(-1.2815515655446004),
            Bound(1.2815515655446004),
            Bound(-1.959963984540054),
            Bound(1.959963984540054),
            [.. mean.Select((m, i) => PredictiveQuantiles.Gaussian(m, sd[i], Probabilities))]);
    }

    private static double[] AbsoluteErrors(DayAheadForecasts f, double[] y) => [.. y.Select((v, i) => Math.Abs(v - f.Mean[i]))];

    private static double[] Crps(DayAheadForecasts f, double[] y) => [.. y.Select((v, i) => f.Distribution[i].Crps(v))];

    private static double[] Brier(DayAheadForecasts f, double[] y) => [.. y.Select((v, i) => Math.Pow(f.Distribution[i].ProbabilityBelow(0) - (v < 0 ? 1 : 0), 2))];

    private static double[] Doubles(JsonElement e, string name) => [.. e.GetProperty(name).EnumerateArray().Select(v => v.GetDouble())];

    private static string Invariant(FormattableString text) => text.ToString(CultureInfo.InvariantCulture);
}
