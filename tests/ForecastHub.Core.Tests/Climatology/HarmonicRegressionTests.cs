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

    [Theory]
    [InlineData("Europe/Berlin")]
    [InlineData("America/St_Johns")]
    public void HourlyDesignRowsEqualTheCalendarDefinitionAcrossYearEndsLeapDaysAndMinutes(string zoneId)
    {
        // Every 37 minutes over 2015-12-30 .. 2017-01-02 (a leap year, two year ends, a :30 zone offset).
        var times = Enumerable.Range(0, 1500 * 24 * 60 / 37 / 4).Select(i => new DateTimeOffset(2015, 12, 30, 0, 0, 0, TimeSpan.Zero).AddMinutes(37.0 * i)).ToArray();
        var design = new HarmonicDesign(GridCadence.Hourly, zoneId, 2, 3);
        var zone = TimeZoneInfo.FindSystemTimeZoneById(zoneId);

        var x = design.ColumnMajor(times);

        for (var i = 0; i < times.Length; i++)
        {
            // The documented definition: local standard time s, hour = hour(s) + minute(s)/60, doy = dayOfYear(s) - 1 + hour/24.
            var s = times[i].UtcDateTime + zone.BaseUtcOffset;
            var hour = s.Hour + s.Minute / 60.0;
            var doy = s.DayOfYear - 1 + hour / 24;
            Assert.Equal(1.0, x[0][i]);
            for (var k = 1; k <= 2; k++)
            {
                Assert.Equal(Math.Cos(2 * Math.PI * k * doy / HarmonicDesign.YearDays), x[2 * k - 1][i], 1e-12);
                Assert.Equal(Math.Sin(2 * Math.PI * k * doy / HarmonicDesign.YearDays), x[2 * k][i], 1e-12);
            }

            for (var j = 1; j <= 3; j++)
            {
                Assert.Equal(Math.Cos(2 * Math.PI * j * hour / 24), x[4 + 2 * j - 1][i], 1e-12);
                Assert.Equal(Math.Sin(2 * Math.PI * j * hour / 24), x[4 + 2 * j][i], 1e-12);
            }
        }
    }

    [Fact]
    public void GlsOverTwoSegmentsEqualsOlsOnExplicitlyPrewhitenedRows()
    {
        // Segment lengths that are not multiples of the QR block, so blocks end inside and at segment ends.
        var times = Enumerable.Range(0, 3000).Select(i => SomeGrid.Start.AddHours(i)).ToArray();
        var design = new HarmonicDesign(GridCadence.Hourly, "UTC", 0, 3);
        var x = design.ColumnMajor(times);
        var random = new Random(11);
        var y = times.Select((_, i) => 5 + 3 * x[1][i] + random.NextDouble()).ToArray();
        (int Start, int Length)[] segments = [(0, 1301), (1301, 1699)];
        double[] phi = [0.6, -0.2, 0.1];

        var gls = HarmonicRegression.Gls(x, y, segments, phi);

        double[] Whiten(double[] v) => [.. segments.SelectMany(seg => Enumerable.Range(seg.Start + phi.Length, seg.Length - phi.Length)
            .Select(t => v[t] - phi[0] * v[t - 1] - phi[1] * v[t - 2] - phi[2] * v[t - 3]))];
        var ols = HarmonicRegression.Ols(x.Select(Whiten).ToArray(), Whiten(y));
        Assert.Equal(ols.Df, gls.Df);
        Assert.Equal(ols.Sigma, gls.Sigma, 1e-12);
        for (var i = 0; i < ols.Coefficients.Length; i++)
        {
            Assert.Equal(ols.Coefficients[i], gls.Coefficients[i], 1e-10);
            Assert.Equal(ols.StdErrors[i], gls.StdErrors[i], 1e-12);
        }
    }

    [Fact]
    public void RegressionsOnTheLeadingRowsOfLongerColumnsEqualThoseOnCopiesOfTheRows()
    {
        // A calibration fold's fit reads the first rows of the window's design in place of a copy of them.
        var times = Enumerable.Range(0, 3000).Select(i => SomeGrid.Start.AddHours(i)).ToArray();
        var x = new HarmonicDesign(GridCadence.Hourly, "UTC", 0, 3).ColumnMajor(times);
        var random = new Random(5);
        var y = times.Select((_, i) => 2 - x[2][i] + random.NextDouble()).ToArray();
        const int rows = 2100;
        var copies = x.Select(column => column[..rows]).ToArray();
        (int Start, int Length)[] segments = [(0, 700), (700, rows - 700)];
        double[] phi = [0.5, 0.2];

        var pairs = new[]
        {
            (HarmonicRegression.OlsOnLeadingRows(x, y[..rows]), HarmonicRegression.Ols(copies, y[..rows])),
            (HarmonicRegression.GlsOnLeadingRows(x, y[..rows], segments, phi), HarmonicRegression.Gls(copies, y[..rows], segments, phi)),
        };

        foreach (var (leading, copied) in pairs)
        {
            Assert.Equal(copied.Coefficients, leading.Coefficients);
            Assert.Equal(copied.StdErrors, leading.StdErrors);
            Assert.Equal(copied.Sigma, leading.Sigma);
        }

        Assert.Throws<ArgumentException>(() => HarmonicRegression.Ols(x, y[..rows]));
        Assert.Throws<ArgumentException>(() => HarmonicRegression.OlsOnLeadingRows(copies, y));
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
