using System.Runtime.CompilerServices;
using System.Collections.Concurrent;
using System.Globalization;
using System.Text;

namespace ForecastHub.Api.Metrics;

/// <summary>
/// A small Prometheus registry written by hand: one instance per host (a static registry would
/// mix the counts of test hosts running side by side), rendered in text exposition format 0.0.4.
/// </summary>
public sealed class MetricsRegistry
{
    private readonly ConcurrentDictionary<string, Metric> metrics = new(StringComparer.Ordinal);

    public Counter Counter(string name, string help, params string[] labelNames) =>
        (Counter)metrics.GetOrAdd(name, _ => new Counter(name, help, labelNames));

    public Histogram Histogram(string name, string help, double[] buckets, params string[] labelNames) =>
        (Histogram)metrics.GetOrAdd(name, _ => new Histogram(name, help, buckets, labelNames));

    /// <summary>A gauge whose samples are read when the page is rendered.</summary>
    public void Gauge(string name, string help, Func<IEnumerable<(string[] Labels, double Value)>> read, params string[] labelNames) =>
        metrics[name] = new CallbackGauge(name, help, labelNames, read);

    public string Render()
    {
        var text = new StringBuilder();
        foreach (var metric in metrics.Values.OrderBy(m => m.Name, StringComparer.Ordinal))
        {
            text.Append("# HELP ").Append(metric.Name).Append(' ').Append(EscapeHelp(metric.Help)).Append('\n');
            text.Append("# TYPE ").Append(metric.Name).Append(' ').Append(metric.Type).Append('\n');
            metric.Write(text);
        }

        return text.ToString();
    }

    internal static string Number(double value) => value switch
    {
        double.PositiveInfinity => "+Inf",
        double.NegativeInfinity => "-Inf",
        _ when double.IsNaN(value) => "NaN",
        _ => value.ToString("R", CultureInfo.InvariantCulture),
    };

    internal static string Labels(string[] names, string[] values, string? extraName = null, string? extraValue = null)
    {
        if (names.Length == 0 && extraName is null)
        {
            return string.Empty;
        }

        var parts = names.Select((n, i) => $"{n}=\"{EscapeLabel(values[i])}\"").ToList();
        if (extraName is not null)
        {
            parts.Add($"{extraName}=\"{EscapeLabel(extraValue!)}\"");
        }

        return "{" + string.Join(',', parts) + "}";
    }

    private static string EscapeLabel(string value) =>
        value.Replace("\\", "\\\\", StringComparison.Ordinal).Replace("\"", "\\\"", StringComparison.Ordinal).Replace("\n", "\\n", StringComparison.Ordinal);

    private static string EscapeHelp(string value) =>
        value.Replace("\\", "\\\\", StringComparison.Ordinal).Replace("\n", "\\n", StringComparison.Ordinal);
}

public abstract class Metric(string name, string help, string[] labelNames)
{
    public string Name { get; } = name;

    public string Help { get; } = help;

    public string[] LabelNames { get; } = labelNames;

    public abstract string Type { get; }

    internal abstract void Write(StringBuilder text);

    protected void CheckLabels(string[] values)
    {
        if (values.Length != LabelNames.Length)
        {
            throw new ArgumentException($"Metric {Name} takes {LabelNames.Length} label values.", nameof(values));
        }
    }

    // Label values joined with a separator that cannot occur in them unescaped.
    protected static string Key(string[] values) => string.Join('\u001f', values);
}

public sealed class Counter(string name, string help, string[] labelNames) : Metric(name, help, labelNames)
{
    private readonly ConcurrentDictionary<string, (string[] Labels, StrongBox<double> Value)> series = new(StringComparer.Ordinal);

    public override string Type => "counter";

    public void Inc(double amount = 1, params string[] labels)
    {
        CheckLabels(labels);
        var box = series.GetOrAdd(Key(labels), _ => (labels, new StrongBox<double>(0))).Value;
        lock (box)
        {
            box.Value += amount;
        }
    }

    public double Value(params string[] labels) =>
        series.TryGetValue(Key(labels), out var s) ? s.Value.Value : 0;

    internal override void Write(StringBuilder text)
    {
        foreach (var (labels, box) in series.Values.OrderBy(s => Key(s.Labels), StringComparer.Ordinal))
        {
            text.Append(Name).Append(MetricsRegistry.Labels(LabelNames, labels)).Append(' ')
                .Append(MetricsRegistry.Number(box.Value)).Append('\n');
        }
    }
}

public sealed class Histogram : Metric
{
    private readonly double[] bounds;
    private readonly ConcurrentDictionary<string, Series> series = new(StringComparer.Ordinal);

    public Histogram(string name, string help, double[] buckets, string[] labelNames)
        : base(name, help, labelNames)
    {
        bounds = [.. buckets.Order()];
    }

    public override string Type => "histogram";

    public void Observe(double value, params string[] labels)
    {
        CheckLabels(labels);
        var s = series.GetOrAdd(Key(labels), _ => new Series(labels, bounds.Length));
        lock (s)
        {
            for (var i = 0; i < bounds.Length; i++)
            {
                if (value <= bounds[i])
                {
                    s.Buckets[i]++;
                }
            }

            s.Count++;
            s.Sum += value;
        }
    }

    public long Count(params string[] labels) => series.TryGetValue(Key(labels), out var s) ? s.Count : 0;

    internal override void Write(StringBuilder text)
    {
        foreach (var s in series.Values.OrderBy(s => Key(s.Labels), StringComparer.Ordinal))
        {
            lock (s)
            {
                for (var i = 0; i < bounds.Length; i++)
                {
                    text.Append(Name).Append("_bucket").Append(MetricsRegistry.Labels(LabelNames, s.Labels, "le", MetricsRegistry.Number(bounds[i])))
                        .Append(' ').Append(s.Buckets[i].ToString(CultureInfo.InvariantCulture)).Append('\n');
                }

                text.Append(Name).Append("_bucket").Append(MetricsRegistry.Labels(LabelNames, s.Labels, "le", "+Inf"))
                    .Append(' ').Append(s.Count.ToString(CultureInfo.InvariantCulture)).Append('\n');
                text.Append(Name).Append("_sum").Append(MetricsRegistry.Labels(LabelNames, s.Labels)).Append(' ')
                    .Append(MetricsRegistry.Number(s.Sum)).Append('\n');
                text.Append(Name).Append("_count").Append(MetricsRegistry.Labels(LabelNames, s.Labels)).Append(' ')
                    .Append(s.Count.ToString(CultureInfo.InvariantCulture)).Append('\n');
            }
        }
    }

    private sealed class Series(string[] labels, int buckets)
    {
        public string[] Labels { get; } = labels;

        public long[] Buckets { get; } = new long[buckets];

        public long Count { get; set; }

        public double Sum { get; set; }
    }
}

public sealed class CallbackGauge(string name, string help, string[] labelNames, Func<IEnumerable<(string[] Labels, double Value)>> read)
    : Metric(name, help, labelNames)
{
    public override string Type => "gauge";

    internal override void Write(StringBuilder text)
    {
        foreach (var (labels, value) in read())
        {
            text.Append(Name).Append(MetricsRegistry.Labels(LabelNames, labels)).Append(' ')
                .Append(MetricsRegistry.Number(value)).Append('\n');
        }
    }
}
