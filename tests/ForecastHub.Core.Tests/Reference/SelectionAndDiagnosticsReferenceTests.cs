using System.Text.Json;
using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Diagnostics;
using ForecastHub.Core.Selection;
using ForecastHub.Core.Tests.Support;

namespace ForecastHub.Core.Tests.Reference;

/// <summary>
/// Order policies, ML criteria and residual diagnostics against the fixture of
/// tests/reference/ar-fixtures.R (R 4.2.2 Patched stats; tseries 0.10-53 jarque.bera.test).
/// </summary>
public sealed class SelectionAndDiagnosticsReferenceTests
{
    private static readonly JsonElement Fixture = ReferenceFixture.Load("ar-reference.json");

    public static TheoryData<string> SeriesNames => new() { "LakeHuron", "lh", "ar1-0.97", "ar3" };

    [Theory]
    [MemberData(nameof(SeriesNames))]
    public void PacfAicChoosesTheSmallestAicAmongOrdersUpToTheLastPacfOutsideTheBand(string name)
    {
        var series = Series(name);
        var pacf = series.Doubles("pacf");
        var band = series.Number("band");
        var aic = series.GetProperty("yuleWalker").Doubles("aic");

        // Expected from R alone: P = last lag with |pacf| > qnorm(0.975)/sqrt(n), then argmin of ar.yw's $aic over 0..P.
        var cutoff = 0;
        for (var k = 1; k <= pacf.Length; k++)
        {
            cutoff = Math.Abs(pacf[k - 1]) > band ? k : cutoff;
        }

        var expected = Enumerable.Range(0, cutoff + 1).MinBy(order => aic[order]);

        var result = OrderSelection.Select(series.Doubles("values"), ArMethod.YuleWalker, OrderPolicy.PacfAic, 48);
        var pacfOnly = OrderSelection.Select(series.Doubles("values"), ArMethod.YuleWalker, OrderPolicy.Pacf, 48);

        Assert.Equal(series.Whole("orderMax"), result.MaxOrder);
        Assert.Equal(cutoff, result.PacfCutoff);
        Assert.Equal(expected, result.ChosenOrder);
        Assert.Equal(expected, result.Model.Order);
        Assert.Equal(cutoff, pacfOnly.ChosenOrder);
        Assert.Equal(Enumerable.Range(1, result.MaxOrder), result.Pacf.Select(p => p.Lag));
    }

    [Theory]
    [InlineData("LakeHuron")]
    [InlineData("lh")]
    [InlineData("ar3")]
    public void MaxLikelihoodCriteriaMatchArimaAicAndBic(string name)
    {
        var series = Series(name);

        // R arima(method = "ML") $aic and BIC(fit) = -2 logL + (p + 2) log n; optimised fits: tolerance 1e-4 relative.
        var result = OrderSelection.Select(series.Doubles("values"), ArMethod.MaxLikelihood, OrderPolicy.Aic, 3);

        Assert.Equal(CriteriaSample.ExactLikelihood, result.CriteriaSample);
        foreach (var fit in series.GetProperty("maxLikelihood").EnumerateArray())
        {
            var row = result.Criteria[fit.Whole("order")];
            Close.Equal(fit.Number("aic"), row.Aic, 1e-4, "ML aic");
            Close.Equal(fit.Number("bic"), row.Bic, 1e-4, "ML bic");
        }
    }

    [Theory]
    [MemberData(nameof(SeriesNames))]
    public void ResidualMomentsAndJarqueBeraMatchR(string name)
    {
        var series = Series(name);
        var r = series.GetProperty("yuleWalker");
        var expected = r.GetProperty("residuals");
        var model = ArFit.Fit(series.Doubles("values"), r.Whole("order"), ArMethod.YuleWalker);
        var residuals = ArFit.Residuals(model, [series.Doubles("values")]);

        // R mean, sd and moment skewness/kurtosis of ar.yw residuals; tseries jarque.bera.test; tolerance 1e-8.
        var moments = ResidualSummary.Of(residuals);
        var jb = JarqueBera.Test(residuals);

        Assert.Equal(expected.Whole("count"), moments.Count);
        Close.Equal(expected.Number("mean"), moments.Mean, 1e-8, "mean");
        Close.Equal(expected.Number("sd"), moments.Sd, 1e-8, "sd");
        Close.Equal(expected.Number("skewness"), moments.Skewness, 1e-8, "skewness");
        Close.Equal(expected.Number("kurtosis"), moments.Kurtosis, 1e-8, "kurtosis");
        Close.Equal(expected.Number("jarqueBera"), jb.Statistic, 1e-8, "Jarque-Bera");
        Close.Equal(expected.Number("jarqueBeraP"), jb.PValue, 1e-8, "Jarque-Bera p");
    }

    private static JsonElement Series(string name) =>
        Fixture.GetProperty("series").EnumerateArray().Single(s => s.GetProperty("name").GetString() == name);
}
