using ForecastHub.Core.Climatology;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Risk;
using ForecastHub.Core.Tests.Support;
using MathNet.Numerics.Distributions;

namespace ForecastHub.Core.Tests.Risk;

/// <summary>
/// Reliability of calibrated per-step probabilities on 30,000 simulated held-out outcomes: an AR(2)
/// with skewed innovations (centred exponential, so a Gaussian CDF is wrong in the tails) is fitted on
/// 40,000 hours (the calibration table rests on at most 3,000 rolling origins whatever the length; with
/// 8,000 hours their overlap left the middle deciles up to 4.4 points off, so this check needs the
/// longer, less overlapping spread of origins); from 30,000 later origins each forecast gives the chance of falling below a threshold
/// drawn at random around the step's mean; in every decile bin of forecast probability the observed
/// frequency lies within 3 points of the mean forecast (the check of the issue; binning as in Wilks,
/// Statistical Methods in the Atmospheric Sciences, reliability diagram, from memory).
/// </summary>
public sealed class CalibratedProbabilityTests
{
    // The fit window covers all FitHours (the hourly default window, 400 days, would keep only the last 9,600).
    private const int FitHours = 40_000;
    private const int Outcomes = 30_000;

    [Fact]
    public void CalibratedProbabilitiesAreReliableInEveryDecileWhereGaussianOnesAreNot()
    {
        var values = SkewedAr(FitHours + Outcomes + 60, seed: 5);
        var model = SiteModelFitter.Fit(SomeGrid.HourlyGrid(values[..FitHours]), new ModelSettings { Seasonality = Seasonality.None, MaxOrder = 6, FitWindowDays = FitHours / 24 + 1 });
        Assert.NotNull(model.Calibration);

        var random = new Random(17);
        var calibrated = new (double P, bool Hit)[Outcomes];
        var gaussian = new (double P, bool Hit)[Outcomes];
        for (var i = 0; i < Outcomes; i++)
        {
            var origin = FitHours + i;
            var horizon = 1 + (i % 6);
            var grid = RecentGrid(values, origin);
            var step = SiteForecaster.Forecast(model, grid, horizon, [0.8], [], seed: 1, paths: 0).Steps[^1];
            // Thresholds spread so that forecast probabilities fill every decile about equally.
            var distribution = PredictiveDistribution.Of(step.Mean, step.Sd, model.Calibration, horizon);
            var threshold = distribution.ValueAtScore(Normal.InvCDF(0, 1, random.NextDouble()));
            var hit = values[origin + horizon] < threshold;
            calibrated[i] = (distribution.Probability(ThresholdDirection.Below, threshold), hit);
            gaussian[i] = (Normal.CDF(step.Mean, step.Sd, threshold), hit);
        }

        var table = string.Join("; ", Deciles(calibrated).Select(b => $"{b.Mean:F3}->{b.Observed:F3} ({b.Count})")) + " | gaussian " + string.Join("; ", Deciles(gaussian).Select(b => $"{b.Mean:F3}->{b.Observed:F3} ({b.Count})"));
        foreach (var (mean, observed, count) in Deciles(calibrated))
        {
            Assert.True(Math.Abs(mean - observed) <= 0.03, $"calibrated bin at {mean:F3}: observed {observed:F3} over {count}; {table}");
        }

        Assert.Contains(Deciles(gaussian), b => Math.Abs(b.Mean - b.Observed) > 0.03);
    }

    private static IEnumerable<(double Mean, double Observed, int Count)> Deciles((double P, bool Hit)[] cases) =>
        cases.GroupBy(c => Math.Min(9, (int)(c.P * 10)))
            .Where(g => g.Count() >= 200)
            .Select(g => (g.Average(c => c.P), g.Average(c => c.Hit ? 1.0 : 0.0), g.Count()))
            .ToArray();

    private static TimeGrid RecentGrid(double[] values, int last)
    {
        var first = last - 20;
        return GridBuilder.Build(
            Enumerable.Range(first, 21).Select(t => new GridReading(SomeGrid.Start.AddHours(t), values[t])),
            SomeGrid.Hourly(),
            SomeGrid.Start.AddHours(first),
            SomeGrid.Start.AddHours(last + 1));
    }

    private static double[] SkewedAr(int count, int seed)
    {
        var random = new Random(seed);
        var x = new double[count];
        double a1 = 0, a2 = 0;
        for (var t = -200; t < count; t++)
        {
            var e = -Math.Log(1 - random.NextDouble()) - 1;
            var a = (0.9 * a1) - (0.2 * a2) + (1.2 * e);
            (a2, a1) = (a1, a);
            if (t >= 0)
            {
                x[t] = 5 + a;
            }
        }

        return x;
    }
}
