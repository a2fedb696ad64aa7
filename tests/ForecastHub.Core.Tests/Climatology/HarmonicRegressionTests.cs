using System.Text.Json;
using ForecastHub.Core.Climatology;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Series;
using ForecastHub.Core.Tests.Support;
using Xunit.Abstractions;

namespace ForecastHub.Core.Tests.Climatology;

/// <summary>Reference: R 4.2.2 stats::lm and stats::arima (tests/reference/climatology-fixtures.R).</summary>
public sealed class HarmonicRegressionTests(ITestOutputHelper output)
{
    [Theory]
    [InlineData("tempMax", 1)]
    [InlineData("tempMin", 2)]
    public void SeattleAnnualHarmonicsMatchRLm(string column, int csvColumn)
    {
        var (dates, max, min) = SeattleWeather.Load();
        var y = csvColumn == 1 ? max : min;
        var grid = SeattleWeather.Grid(dates, y, DailyStatistic.Mean);
        var design = new HarmonicDesign(GridCadence.Daily, SeattleWeather.Zone, 2, 0);

        var fit = HarmonicRegression.Ols(design.ColumnMajor(grid.Times), grid.Values);

        var reference = ReferenceFixture.Load("climatology-seattle.json").GetProperty(column);
        Assert.Equal(reference.GetProperty("terms").EnumerateArray().Select(t => t.GetString()), design.TermNames());
        AssertClose(reference, fit, 1e-9);
    }

    [Fact]
    public void HourlyAnnualAndDiurnalHarmonicsOnLocalStandardTimeMatchRLm()
    {
        var fixture = ReferenceFixture.Load("climatology-hourly-berlin.json");
        var y = fixture.Doubles("values");
        var t0 = DateTimeOffset.FromUnixTimeSeconds(fixture.GetProperty("firstEpochSeconds").GetInt64());
        var times = Enumerable.Range(0, y.Length).Select(i => t0.AddHours(i)).ToArray();
        var design = new HarmonicDesign(GridCadence.Hourly, "Europe/Berlin", 2, 3);

        var fit = HarmonicRegression.Ols(design.ColumnMajor(times), y);

        AssertClose(fixture.GetProperty("lm"), fit, 1e-9);
    }

    [Fact]
    public void GlsWithAr1ErrorsIsCloseToRArimaMaximumLikelihoodAndWidensStandardErrors()
    {
        var (dates, max, _) = SeattleWeather.Load();
        var train = dates.Count(d => d.Year < 2015);
        var grid = SeattleWeather.Grid(dates[..train], max[..train], DailyStatistic.Max);
        var design = new HarmonicDesign(GridCadence.Daily, SeattleWeather.Zone, 2, 0);
        var reference = ReferenceFixture.Load("climatology-seattle.json").GetProperty("arimaXregTrain").GetProperty("tempMax");
        var ar1 = reference.GetProperty("ar1").GetDouble();
        var x = design.ColumnMajor(grid.Times);

        var ols = HarmonicRegression.Ols(x, grid.Values);
        var gls = HarmonicRegression.Gls(x, grid.Values, [(0, grid.Count)], [ar1]);

        var expected = reference.Doubles("coefficients");
        var expectedSe = reference.Doubles("stdErrors");
        for (var i = 0; i < expected.Length; i++)
        {
            output.WriteLine($"{design.TermNames()[i]}: gls {gls.Coefficients[i]:F4} (se {gls.StdErrors[i]:F4}), R ML {expected[i]:F4} (se {expectedSe[i]:F4}), ols se {ols.StdErrors[i]:F4}");

            // Conditional (GLS) and exact ML estimates differ only through the first observation: within 0.25 SE.
            Assert.True(Math.Abs(gls.Coefficients[i] - expected[i]) < 0.25 * expectedSe[i]);
            Assert.True(Math.Abs(gls.StdErrors[i] / expectedSe[i] - 1) < 0.05);
            Assert.True(gls.StdErrors[i] > 1.5 * ols.StdErrors[i]);
        }
    }

    [Fact]
    public void AnnualTermsOnAFewDaysAreRefusedAsTooShort()
    {
        var times = Enumerable.Range(0, 20).Select(i => SomeGrid.Start.AddDays(i)).ToArray();
        var design = new HarmonicDesign(GridCadence.Daily, "UTC", 2, 0);
        var values = times.Select((_, i) => Math.Sin(i)).ToArray();

        var fit = HarmonicRegression.Ols(design.ColumnMajor(times), values);
        var tooFew = Assert.Throws<SeriesException>(() => HarmonicRegression.Ols(design.ColumnMajor(times[..5]), values[..5]));

        Assert.Equal(5, fit.Coefficients.Length);
        Assert.Equal(SeriesProblem.TooShort, tooFew.Problem);
    }

    [Fact]
    public void NaNInTheResponseIsRefusedAsNonFinite()
    {
        var times = Enumerable.Range(0, 30).Select(i => SomeGrid.Start.AddHours(i)).ToArray();
        var design = new HarmonicDesign(GridCadence.Hourly, "UTC", 0, 1);
        var values = times.Select((_, i) => i == 7 ? double.NaN : i).ToArray();

        var e = Assert.Throws<SeriesException>(() => HarmonicRegression.Ols(design.ColumnMajor(times), values));

        Assert.Equal(SeriesProblem.NonFinite, e.Problem);
    }

    private static void AssertClose(JsonElement reference, RegressionFit fit, double relative)
    {
        var coefficients = reference.Doubles("coefficients");
        var se = reference.Doubles("stdErrors");
        for (var i = 0; i < coefficients.Length; i++)
        {
            Assert.Equal(coefficients[i], fit.Coefficients[i], relative * Math.Max(1, Math.Abs(coefficients[i])));
            Assert.Equal(se[i], fit.StdErrors[i], relative * se[i]);
        }

        Assert.Equal(reference.GetProperty("sigma").GetDouble(), fit.Sigma, relative);
        Assert.Equal(reference.GetProperty("df").GetInt32(), fit.Df);
    }
}
