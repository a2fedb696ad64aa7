namespace ForecastHub.Api.Metrics;

/// <summary>The service's named metrics, so every feature counts under the same names.</summary>
public sealed class ServiceMetrics
{
    // Seconds; fits of a year of hourly data take tens of milliseconds, forecasts well under one.
    private static readonly double[] FitBuckets = [0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10];
    private static readonly double[] ForecastBuckets = [0.0001, 0.00025, 0.0005, 0.001, 0.0025, 0.005, 0.01, 0.025, 0.05, 0.1];

    public ServiceMetrics(MetricsRegistry registry)
    {
        ArgumentNullException.ThrowIfNull(registry);
        Registry = registry;
        Readings = registry.Counter("forecasthub_readings_total", "Readings received, by outcome (accepted, duplicate, replaced, flagged, rejected).", "outcome");
        Fits = registry.Counter("forecasthub_fits_total", "Model fits, by outcome (ok, failed).", "outcome");
        FitDuration = registry.Histogram("forecasthub_fit_duration_seconds", "Time one site's model fit took.", FitBuckets);
        ForecastDuration = registry.Histogram("forecasthub_forecast_duration_seconds", "Time to answer a forecast, by cache (hit, miss).", ForecastBuckets, "cache");
    }

    /// <summary>Sites per health state, read from the latest fleet evaluation when the page is rendered.</summary>
    public void AddSitesByStateGauge(Func<IReadOnlyDictionary<string, int>?> sitesByState)
    {
        ArgumentNullException.ThrowIfNull(sitesByState);
        Registry.Gauge("forecasthub_sites", "Sites by model-health state, as of the latest fleet evaluation.",
            () => (sitesByState() ?? new Dictionary<string, int>()).Select(kv => (new[] { kv.Key }, (double)kv.Value)), "state");
    }

    /// <summary>The refit queue's length, read when the page is rendered.</summary>
    public void AddRefitQueueGauge(Func<int> refitQueueLength)
    {
        ArgumentNullException.ThrowIfNull(refitQueueLength);
        Registry.Gauge("forecasthub_refit_queue_length", "Sites waiting to be looked at by the refit service.",
            () => [([], refitQueueLength())]);
    }

    public MetricsRegistry Registry { get; }

    public Counter Readings { get; }

    public Counter Fits { get; }

    public Histogram FitDuration { get; }

    public Histogram ForecastDuration { get; }
}
