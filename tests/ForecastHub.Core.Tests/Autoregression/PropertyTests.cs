using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Forecasting;
using ForecastHub.Core.Tests.Support;

namespace ForecastHub.Core.Tests.Autoregression;

/// <summary>Statistical properties on seeded simulations (sizes from issue 6; seeds fixed so results are reproducible).</summary>
public sealed class PropertyTests
{
    private static readonly double[] Phi = [0.5, -0.3, 0.2];

    [Theory]
    [MemberData(nameof(SomeAr.Methods), MemberType = typeof(SomeAr))]
    public void LongSimulatedSeriesRecoversEveryCoefficientWithinThreeStandardErrors(ArMethod method)
    {
        var series = SomeAr.ArSeries(20_000, Phi, sigma: 1.5, mean: 7, seed: 11);

        var model = ArFit.Fit(series, 3, method);

        for (var i = 0; i < Phi.Length; i++)
        {
            var z = (model.Coefficients[i] - Phi[i]) / model.StandardErrors[i];
            Assert.True(Math.Abs(z) < 3, $"phi_{i + 1}: {model.Coefficients[i]:F4} is {z:F2} standard errors from {Phi[i]}");
        }

        Assert.Equal(2.25, model.InnovationVariance, 0.1);
    }

    [Fact]
    public void GaussianIntervalsCoverNominallyAtEveryHorizon()
    {
        var phi = new[] { 0.6, 0.25 };
        var history = SomeAr.ArSeries(20_000, phi, seed: 21);
        var model = ArFit.Fit(history, 2, ArMethod.Burg);
        var path = ArForecast.Forecast(model, history, 24);
        var random = new Random(22);
        var covered95 = new int[24];
        var covered80 = new int[24];
        const int Outcomes = 10_000;
        for (var run = 0; run < Outcomes; run++)
        {
            double previous2 = history[^2], previous1 = history[^1];
            for (var h = 0; h < 24; h++)
            {
                var next = phi[0] * previous1 + phi[1] * previous2 + SomeAr.Gaussian(random);
                covered95[h] += Inside(GaussianInterval.Of(path.Mean[h], path.Sd[h], 0.95), next);
                covered80[h] += Inside(GaussianInterval.Of(path.Mean[h], path.Sd[h], 0.80), next);
                (previous2, previous1) = (previous1, next);
            }
        }

        for (var h = 0; h < 24; h++)
        {
            var share95 = covered95[h] / (double)Outcomes;
            var share80 = covered80[h] / (double)Outcomes;
            Assert.True(share95 is >= 0.94 and <= 0.96, $"h={h + 1}: 95% interval covered {share95:P2}");
            Assert.True(share80 is >= 0.78 and <= 0.82, $"h={h + 1}: 80% interval covered {share80:P2}");
        }
    }

    private static int Inside(PredictionInterval interval, double value) => value >= interval.Lower && value <= interval.Upper ? 1 : 0;
}
