namespace ForecastHub.Api.Metrics;

/// <summary>Configuration section <c>Metrics</c>.</summary>
public sealed class MetricsOptions
{
    public const string SectionName = "Metrics";

    /// <summary>A local port on which <c>GET /metrics</c> needs no key (the service must also listen
    /// on it, e.g. <c>ASPNETCORE_URLS=http://+:8080;http://+:9464</c>); 0 keeps the key everywhere.</summary>
    public int AnonymousPort { get; set; }

    /// <summary>Sites exported with per-site series, in site-id order; the rest are counted in
    /// <c>forecasthub_site_series_omitted</c> and appear only in the per-state totals.</summary>
    public int MaxSiteSeries { get; set; } = 1000;
}
