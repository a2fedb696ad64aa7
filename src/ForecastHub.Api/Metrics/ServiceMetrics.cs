using System.Diagnostics.Metrics;

namespace ForecastHub.Api.Metrics;

/// <summary>
/// The service's instruments on one <see cref="Meter"/> made by the host's <see cref="IMeterFactory"/>
/// (so test hosts running side by side never mix their counts). The Prometheus exporter names them
/// <c>forecasthub_readings_total</c>, <c>forecasthub_fits_total</c>, <c>forecasthub_fit_duration_seconds</c>
/// and <c>forecasthub_forecast_duration_seconds</c>: dots become underscores, counters gain
/// <c>_total</c> and the unit <c>s</c> gains <c>_seconds</c>.
/// </summary>
public sealed class ServiceMetrics
{
    public const string MeterName = "ForecastHub";

    // Seconds; fits of a year of hourly data take tens of milliseconds, forecasts well under one.
    private static readonly double[] FitBuckets = [0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10];
    private static readonly double[] ForecastBuckets = [0.0001, 0.00025, 0.0005, 0.001, 0.0025, 0.005, 0.01, 0.025, 0.05, 0.1];

    public ServiceMetrics(IMeterFactory meters)
    {
        ArgumentNullException.ThrowIfNull(meters);
        Meter = meters.Create(MeterName);
        Readings = new TaggedCounter(Meter.CreateCounter<long>("forecasthub.readings",
            description: "Readings received, by outcome (accepted, duplicate, replaced, flagged, rejected)."), "outcome");
        Fits = new TaggedCounter(Meter.CreateCounter<long>("forecasthub.fits", description: "Model fits, by outcome (ok, failed)."), "outcome");
        FitDuration = new TaggedHistogram(Meter.CreateHistogram("forecasthub.fit.duration", "s", "Time one site's model fit took.",
            advice: new InstrumentAdvice<double> { HistogramBucketBoundaries = FitBuckets }), null);
        ForecastDuration = new TaggedHistogram(Meter.CreateHistogram("forecasthub.forecast.duration", "s", "Time to answer a forecast, by cache (hit, miss).",
            advice: new InstrumentAdvice<double> { HistogramBucketBoundaries = ForecastBuckets }), "cache");
    }

    public Meter Meter { get; }

    public TaggedCounter Readings { get; }

    public TaggedCounter Fits { get; }

    public TaggedHistogram FitDuration { get; }

    public TaggedHistogram ForecastDuration { get; }
}

/// <summary>A counter with one tag whose name is fixed here, so callers pass only its value.</summary>
public sealed class TaggedCounter(Counter<long> counter, string tagName)
{
    public void Inc(long amount, string tagValue)
    {
        if (amount > 0)
        {
            counter.Add(amount, new KeyValuePair<string, object?>(tagName, tagValue));
        }
    }
}

/// <summary>A histogram with at most one tag whose name is fixed here.</summary>
public sealed class TaggedHistogram(Histogram<double> histogram, string? tagName)
{
    public void Observe(double value, string? tagValue = null)
    {
        if (tagName is null || tagValue is null)
        {
            histogram.Record(value);
        }
        else
        {
            histogram.Record(value, new KeyValuePair<string, object?>(tagName, tagValue));
        }
    }
}
