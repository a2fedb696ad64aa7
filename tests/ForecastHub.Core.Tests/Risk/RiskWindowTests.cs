using ForecastHub.Core.Climatology;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Risk;
using ForecastHub.Core.Tests.Support;

namespace ForecastHub.Core.Tests.Risk;

/// <summary>
/// Window risk checked against a brute-force simulation written here, independent of the service's
/// sampler: plain System.Random with Box-Muller normals, one path at a time, the AR recursion of the
/// fitted model with its seasonal innovation variance, and the definitions of DESIGN section 10 applied
/// literally (any step beyond, first step beyond, hours beyond). Tolerances are Monte Carlo errors.
/// </summary>
public sealed class RiskWindowTests
{
    private static readonly Lazy<(TimeGrid Grid, SiteModel Model)> Berlin = new(() =>
    {
        var grid = SomeGrid.SeasonalHourlyGrid(60 * 24, seed: 11);
        var model = SiteModelFitter.Fit(grid, new ModelSettings { MaxOrder = 10, IntervalMethod = IntervalMethod.Gaussian });
        return (grid, model);
    });

    private static readonly TimeZoneInfo Zone = GridBuilder.FindZone("Europe/Berlin");

    [Theory]
    [InlineData(0, RiskWindow.Night)]
    [InlineData(11, RiskWindow.Night)]
    [InlineData(0, RiskWindow.Next24h)]
    public void WindowProbabilityFirstCrossingAndHoursBeyondMatchABruteForceSimulation(int hoursAfterData, string windowName)
    {
        var (grid, model) = Berlin.Value;
        var now = grid.Times[^1].AddHours(1 + hoursAfterData);
        var plain = SiteForecaster.Forecast(model, grid, 72, [0.8], [], seed: 3, paths: 0);
        var (from, to) = windowName == RiskWindow.Night ? RiskWindows.NightAround(Zone, NightHours.Default, now) : (plain.Steps[0].Time, plain.Steps[0].Time.AddHours(24));
        var inWindow = plain.Steps.Where(s => s.Time.AddHours(1) > from && s.Time < to).ToArray();
        var threshold = new RiskThreshold("frost", ThresholdDirection.Below, inWindow.Min(s => s.Mean) - 0.3);

        var forecast = SiteForecaster.Forecast(model, grid, 72, [0.8], [], seed: 3, risk: new RiskRequest([threshold], NightHours.Default, now));
        var risk = Assert.Single(forecast.Risk, r => r.Window.Name == windowName);
        Assert.Equal(from, risk.Window.From);

        var brute = BruteForce(model, plain.Steps, inWindow[0].Horizon, inWindow[^1].Horizon, threshold.ValueC, paths: 40_000, seed: 99);
        var n = SiteForecaster.DefaultPaths;
        var se = Math.Sqrt(brute.Probability * (1 - brute.Probability) * (1.0 / n + 1.0 / 40_000));
        Assert.InRange(risk.Probability, 0.05, 0.98);
        Assert.Equal(brute.Probability, risk.Probability, 4 * se);
        Assert.Equal(brute.Hours, risk.ExpectedHoursBeyond!.Value, 4 * brute.HoursSd * Math.Sqrt(1.0 / n + 1.0 / 40_000));
        Assert.NotNull(risk.FirstCrossing);
        Assert.InRange((risk.FirstCrossing!.Median - brute.Median).TotalHours, -1, 1);
        Assert.InRange((risk.FirstCrossing.P10 - brute.P10).TotalHours, -1, 1);
        Assert.InRange((risk.FirstCrossing.P90 - brute.P90).TotalHours, -1, 1);
        Assert.Equal(brute.MinMean, risk.Extreme.Mean, 0.05);
    }

    [Fact]
    public void NowInsideANightGivesThatNightUntilItsEndAndAfterItTheComingOne()
    {
        var inside = new DateTimeOffset(2024, 3, 5, 2, 30, 0, TimeSpan.Zero); // 03:30 in Berlin
        var (from, to) = RiskWindows.NightAround(Zone, NightHours.Default, inside);
        Assert.Equal(inside, from);
        Assert.Equal(new DateTimeOffset(2024, 3, 5, 9, 0, 0, TimeSpan.FromHours(1)), to);

        var day = new DateTimeOffset(2024, 3, 5, 10, 0, 0, TimeSpan.Zero);
        (from, to) = RiskWindows.NightAround(Zone, NightHours.Default, day);
        Assert.Equal(new DateTimeOffset(2024, 3, 5, 18, 0, 0, TimeSpan.FromHours(1)), from);
        Assert.Equal(new DateTimeOffset(2024, 3, 6, 9, 0, 0, TimeSpan.FromHours(1)), to);

        // A night inside one calendar day, and one across the spring-forward night (02:00 local skipped on 2024-03-31).
        (from, to) = RiskWindows.NightAround(Zone, new NightHours(new TimeOnly(1, 0), new TimeOnly(5, 0)), day);
        Assert.Equal(new DateTimeOffset(2024, 3, 6, 1, 0, 0, TimeSpan.FromHours(1)), from);
        Assert.Equal(new DateTimeOffset(2024, 3, 6, 5, 0, 0, TimeSpan.FromHours(1)), to);
        (from, to) = RiskWindows.NightAround(Zone, NightHours.Default, new DateTimeOffset(2024, 3, 30, 12, 0, 0, TimeSpan.Zero));
        Assert.Equal(14, (to - from).TotalHours);
    }

    [Fact]
    public void InTheLastHourOfANightThatNoForecastStepReachesTheNightWindowIsTheComingNight()
    {
        // 08:15 in Berlin, the night ending at 09:00, the first forecast step starting at 09:00.
        var now = new DateTimeOffset(2024, 3, 5, 8, 15, 0, TimeSpan.FromHours(1));
        var times = Enumerable.Range(0, 48).Select(k => new DateTimeOffset(2024, 3, 5, 9, 0, 0, TimeSpan.FromHours(1)).AddHours(k)).ToArray();

        var night = Assert.Single(RiskWindows.Plan(GridCadence.Hourly, Zone, NightHours.Default, now, times), p => p.Window.Name == RiskWindow.Night);

        Assert.Equal(new DateTimeOffset(2024, 3, 5, 18, 0, 0, TimeSpan.FromHours(1)), night.Window.From);
        Assert.Equal(new DateTimeOffset(2024, 3, 6, 9, 0, 0, TimeSpan.FromHours(1)), night.Window.To);
        Assert.Equal((10, 24), (night.FirstHorizon, night.LastHorizon));

        // A step still inside the night (from 08:00) keeps the current night, until its end.
        var fromEight = times.Select(t => t.AddHours(-1)).ToArray();
        var current = Assert.Single(RiskWindows.Plan(GridCadence.Hourly, Zone, NightHours.Default, now, fromEight), p => p.Window.Name == RiskWindow.Night);
        Assert.Equal((now, new DateTimeOffset(2024, 3, 5, 9, 0, 0, TimeSpan.FromHours(1))), (current.Window.From, current.Window.To));
    }

    [Fact]
    public void StepProbabilitiesAreTheGaussianCdfForAGaussianModelAndRiskIsEmptyWithoutThresholds()
    {
        var (grid, model) = Berlin.Value;
        var now = grid.Times[^1].AddHours(1);
        var thresholds = new[] { new RiskThreshold("cold", ThresholdDirection.Below, 2.0), new RiskThreshold(null, ThresholdDirection.Above, 6.0) };

        var forecast = SiteForecaster.Forecast(model, grid, 24, [0.8], [], seed: 3, risk: new RiskRequest(thresholds, NightHours.Default, now));

        foreach (var step in forecast.Steps)
        {
            Assert.Equal(MathNet.Numerics.Distributions.Normal.CDF(step.Mean, step.Sd, 2.0), step.Probabilities[0].Probability, 1e-12);
            Assert.Equal(1 - MathNet.Numerics.Distributions.Normal.CDF(step.Mean, step.Sd, 6.0), step.Probabilities[1].Probability, 1e-12);
            Assert.Equal("cold", step.Probabilities[0].Id);
        }

        Assert.Equal(4, forecast.Risk.Count);
        Assert.Empty(SiteForecaster.Forecast(model, grid, 24, [0.8], [], seed: 3, risk: new RiskRequest([], NightHours.Default, now)).Risk);
    }

    [Fact]
    public void DailySitesGetTheNextDayOnlyWithTheStepsOwnProbability()
    {
        var grid = SomeGrid.DailyGrid(SomeAr.ArSeries(400, [0.6], mean: 2), zone: "Europe/Berlin");
        var model = SiteModelFitter.Fit(grid, new ModelSettings { Seasonality = Seasonality.None });
        var today = grid.Times[^1].AddDays(1);
        var threshold = new RiskThreshold("frost", ThresholdDirection.Below, 0);

        var forecast = SiteForecaster.Forecast(model, grid, 3, [0.8], [], seed: 3, risk: new RiskRequest([threshold], NightHours.Default, today));

        var risk = Assert.Single(forecast.Risk);
        Assert.Equal(RiskWindow.Next24h, risk.Window.Name);
        Assert.Equal(forecast.Steps[1].Time, risk.Window.From);
        Assert.Equal(forecast.Steps[1].Probabilities[0].Probability, risk.Probability);
        Assert.Null(risk.ExpectedHoursBeyond);
    }

    private sealed record Brute(double Probability, double Hours, double HoursSd, DateTimeOffset Median, DateTimeOffset P10, DateTimeOffset P90, double MinMean);

    private static Brute BruteForce(SiteModel model, IReadOnlyList<ForecastStep> steps, int firstHorizon, int lastHorizon, double threshold, int paths, int seed)
    {
        var random = new Random(seed);
        var phi = model.Ar.Coefficients;
        var times = steps.Select(s => s.Time).ToArray();
        var g = model.VarianceSeason.Factors(times);
        var crossings = new List<int>();
        var hours = new double[paths];
        var minSum = 0.0;
        for (var j = 0; j < paths; j++)
        {
            var d = new double[lastHorizon];
            var first = -1;
            var min = double.PositiveInfinity;
            for (var k = 0; k < lastHorizon; k++)
            {
                var value = Math.Sqrt(model.Ar.InnovationVariance * g[k]) * SomeAr.Gaussian(random);
                for (var i = 1; i <= Math.Min(k, phi.Count); i++)
                {
                    value += phi[i - 1] * d[k - i];
                }

                d[k] = value;
                var y = steps[k].Mean + d[k];
                if (k + 1 >= firstHorizon)
                {
                    min = Math.Min(min, y);
                    if (y < threshold)
                    {
                        hours[j]++;
                        first = first < 0 ? k : first;
                    }
                }
            }

            minSum += min;
            if (first >= 0)
            {
                crossings.Add(first);
            }
        }

        crossings.Sort();
        DateTimeOffset Quantile(double p) => times[crossings[Math.Max(0, (int)Math.Ceiling(p * crossings.Count) - 1)]];
        var meanHours = hours.Average();
        var sdHours = Math.Sqrt(hours.Sum(h => (h - meanHours) * (h - meanHours)) / (paths - 1));
        return new Brute(crossings.Count / (double)paths, meanHours, sdHours, Quantile(0.5), Quantile(0.1), Quantile(0.9), minSum / paths);
    }
}
