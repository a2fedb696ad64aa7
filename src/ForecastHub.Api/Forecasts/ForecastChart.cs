using System.Globalization;
using System.Net;
using System.Text;

namespace ForecastHub.Api.Forecasts;

/// <summary>One point of observed history for the chart.</summary>
public readonly record struct ChartPoint(DateTimeOffset Time, double Value);

/// <summary>One forecast step for the chart, with its band bounds by level (percent).</summary>
public sealed record ChartStep(DateTimeOffset Time, double Mean, IReadOnlyDictionary<int, (double Lower, double Upper)> Bands);

/// <summary>
/// Writes the forecast chart as a self-contained SVG: recent history as a line, the forecast
/// mean as a dashed line, the 95% and 80% bands as shaded areas, and labelled axes with units.
/// Times are drawn in the site's local clock (the offset each point carries).
/// </summary>
public static class ForecastChart
{
    private const double Width = 800;
    private const double Height = 360;
    private const double Left = 64;
    private const double Right = 16;
    private const double Top = 36;
    private const double Bottom = 56;

    /// <summary>The chart's title: the site, the forecast's origin, and the caution in short.</summary>
    public static string Title(string siteName, DateTimeOffset origin) =>
        Invariant($"{siteName}: forecast from {origin.UtcDateTime:yyyy-MM-dd HH:mm} UTC (own history only; official warnings come first)");

    public static string Render(string title, string unitLabel, IReadOnlyList<ChartPoint> history, IReadOnlyList<ChartStep> forecast)
    {
        ArgumentNullException.ThrowIfNull(history);
        ArgumentNullException.ThrowIfNull(forecast);
        var times = history.Select(p => p.Time).Concat(forecast.Select(s => s.Time)).ToList();
        var values = history.Select(p => p.Value)
            .Concat(forecast.SelectMany(s => s.Bands.Values.SelectMany(b => new[] { b.Lower, b.Upper }).Append(s.Mean)))
            .Where(double.IsFinite)
            .ToList();

        var svg = new StringBuilder();
        svg.Append(Invariant($"<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{Width}\" height=\"{Height}\" viewBox=\"0 0 {Width} {Height}\" role=\"img\" font-family=\"sans-serif\" font-size=\"12\">\n"));
        svg.Append("<title>").Append(WebUtility.HtmlEncode(title)).Append("</title>\n");
        svg.Append(Invariant($"<rect width=\"{Width}\" height=\"{Height}\" fill=\"#ffffff\"/>\n"));
        svg.Append(Invariant($"<text x=\"{Left}\" y=\"22\" font-size=\"14\" font-weight=\"bold\">")).Append(WebUtility.HtmlEncode(title)).Append("</text>\n");

        if (times.Count == 0 || values.Count == 0)
        {
            svg.Append(Invariant($"<text x=\"{Width / 2}\" y=\"{Height / 2}\" text-anchor=\"middle\">No data to draw yet.</text>\n</svg>\n"));
            return svg.ToString();
        }

        var t0 = times.Min().ToUnixTimeSeconds();
        var t1 = Math.Max(times.Max().ToUnixTimeSeconds(), t0 + 3600);
        var (v0, v1, vStep) = NiceRange(values.Min(), values.Max());
        double X(DateTimeOffset t) => Left + ((t.ToUnixTimeSeconds() - t0) / (double)(t1 - t0) * (Width - Left - Right));
        double Y(double v) => Top + ((v1 - v) / (v1 - v0) * (Height - Top - Bottom));

        DrawAxes(svg, unitLabel, times, t0, t1, v0, v1, vStep, X, Y);

        // Wider band first so the narrower one sits on top.
        foreach (var (level, fill) in new[] { (95, "#c7d7ee"), (80, "#8fb0dd") })
        {
            var steps = forecast.Where(s => s.Bands.ContainsKey(level)).ToList();
            if (steps.Count == 0)
            {
                continue;
            }

            var outline = steps.Select(s => (X(s.Time), Y(s.Bands[level].Upper)))
                .Concat(steps.AsEnumerable().Reverse().Select(s => (X(s.Time), Y(s.Bands[level].Lower))));
            svg.Append("<polygon class=\"band-").Append(level.ToString(CultureInfo.InvariantCulture))
                .Append("\" fill=\"").Append(fill).Append("\" fill-opacity=\"0.8\" points=\"").Append(Points(outline)).Append("\"/>\n");
        }

        if (history.Count > 0)
        {
            svg.Append("<polyline class=\"history\" fill=\"none\" stroke=\"#2b2b2b\" stroke-width=\"1.5\" points=\"")
                .Append(Points(history.Where(p => double.IsFinite(p.Value)).Select(p => (X(p.Time), Y(p.Value))))).Append("\"/>\n");
        }

        if (forecast.Count > 0)
        {
            svg.Append("<polyline class=\"forecast\" fill=\"none\" stroke=\"#1f4e99\" stroke-width=\"2\" stroke-dasharray=\"6 3\" points=\"")
                .Append(Points(forecast.Select(s => (X(s.Time), Y(s.Mean))))).Append("\"/>\n");
        }

        DrawLegend(svg);
        svg.Append("</svg>\n");
        return svg.ToString();
    }

    private static void DrawAxes(StringBuilder svg, string unitLabel, List<DateTimeOffset> times, long t0, long t1,
        double v0, double v1, double vStep, Func<DateTimeOffset, double> x, Func<double, double> y)
    {
        var plotBottom = Height - Bottom;
        svg.Append(Invariant($"<line x1=\"{Left}\" y1=\"{Top}\" x2=\"{Left}\" y2=\"{plotBottom}\" stroke=\"#555\"/>\n"));
        svg.Append(Invariant($"<line x1=\"{Left}\" y1=\"{plotBottom}\" x2=\"{Width - Right}\" y2=\"{plotBottom}\" stroke=\"#555\"/>\n"));
        for (var v = v0; v <= v1 + (vStep / 2); v += vStep)
        {
            var yy = y(v);
            svg.Append(Invariant($"<line x1=\"{Left}\" y1=\"{yy:0.##}\" x2=\"{Width - Right}\" y2=\"{yy:0.##}\" stroke=\"#e4e4e4\"/>\n"));
            svg.Append(Invariant($"<text x=\"{Left - 6}\" y=\"{yy + 4:0.##}\" text-anchor=\"end\">{v:0.#}</text>\n"));
        }

        // Ticks at local midnights and noons, with the offset of each point.
        var offset = times[^1].Offset;
        var spanHours = (t1 - t0) / 3600.0;
        var tickHours = spanHours <= 96 ? 12 : spanHours <= 24 * 14 ? 24 : 24 * 7;
        var first = DateTimeOffset.FromUnixTimeSeconds(t0).ToOffset(offset);
        var tick = new DateTimeOffset(first.Year, first.Month, first.Day, 0, 0, 0, offset);
        while (tick.ToUnixTimeSeconds() <= t1)
        {
            if (tick.ToUnixTimeSeconds() >= t0)
            {
                var xx = x(tick);
                var label = tick.Hour == 0 ? tick.ToString("MMM d", CultureInfo.InvariantCulture) : tick.ToString("HH:mm", CultureInfo.InvariantCulture);
                svg.Append(Invariant($"<line x1=\"{xx:0.##}\" y1=\"{plotBottom}\" x2=\"{xx:0.##}\" y2=\"{plotBottom + 5}\" stroke=\"#555\"/>\n"));
                svg.Append(Invariant($"<text x=\"{xx:0.##}\" y=\"{plotBottom + 18}\" text-anchor=\"middle\">{label}</text>\n"));
            }

            tick = tick.AddHours(tickHours);
        }

        var offsetText = offset < TimeSpan.Zero ? "-" + offset.ToString(@"hh\:mm", CultureInfo.InvariantCulture) : "+" + offset.ToString(@"hh\:mm", CultureInfo.InvariantCulture);
        svg.Append(Invariant($"<text class=\"x-label\" x=\"{(Left + Width - Right) / 2}\" y=\"{Height - 12}\" text-anchor=\"middle\">Local time (UTC{offsetText})</text>\n"));
        svg.Append(Invariant($"<text class=\"y-label\" transform=\"translate(16 {(Top + plotBottom) / 2}) rotate(-90)\" text-anchor=\"middle\">Temperature ("))
            .Append(WebUtility.HtmlEncode(unitLabel)).Append(")</text>\n");
    }

    private static void DrawLegend(StringBuilder svg)
    {
        var x = Width - Right - 330;
        svg.Append(Invariant($"<g class=\"legend\" transform=\"translate({x} 14)\">"))
            .Append("<line x1=\"0\" y1=\"4\" x2=\"18\" y2=\"4\" stroke=\"#2b2b2b\" stroke-width=\"1.5\"/><text x=\"22\" y=\"8\">observed</text>")
            .Append("<line x1=\"90\" y1=\"4\" x2=\"108\" y2=\"4\" stroke=\"#1f4e99\" stroke-width=\"2\" stroke-dasharray=\"6 3\"/><text x=\"112\" y=\"8\">forecast</text>")
            .Append("<rect x=\"175\" y=\"-2\" width=\"14\" height=\"12\" fill=\"#8fb0dd\"/><text x=\"193\" y=\"8\">80%</text>")
            .Append("<rect x=\"235\" y=\"-2\" width=\"14\" height=\"12\" fill=\"#c7d7ee\"/><text x=\"253\" y=\"8\">95%</text>")
            .Append("</g>\n");
    }

    // Round the value axis out to a step of 1, 2 or 5 times a power of ten, about six ticks.
    private static (double Low, double High, double Step) NiceRange(double min, double max)
    {
        if (max - min < 1e-9)
        {
            min -= 1;
            max += 1;
        }

        var raw = (max - min) / 6;
        var magnitude = Math.Pow(10, Math.Floor(Math.Log10(raw)));
        var step = new[] { 1.0, 2.0, 5.0, 10.0 }.Select(m => m * magnitude).First(s => s >= raw);
        return (Math.Floor(min / step) * step, Math.Ceiling(max / step) * step, step);
    }

    private static string Points(IEnumerable<(double X, double Y)> points) =>
        string.Join(' ', points.Select(p => Invariant($"{p.X:0.##},{p.Y:0.##}")));

    private static string Invariant(FormattableString text) => text.ToString(CultureInfo.InvariantCulture);
}
