namespace ForecastHub.Api.Http;

/// <summary>Configuration section <c>Cors</c>: origins whose pages may call the API from a browser.</summary>
public sealed class CorsOptions
{
    public const string SectionName = "Cors";

    /// <summary>Exact origins (<c>https://dash.example.org</c>); empty: no CORS headers at all.</summary>
    public string[] Origins { get; set; } = [];
}

/// <summary>Configuration section <c>ForwardedHeaders</c>: the reverse proxies whose
/// <c>X-Forwarded-For</c>/<c>X-Forwarded-Proto</c> are believed; empty: none are.</summary>
public sealed class ProxyOptions
{
    public const string SectionName = "ForwardedHeaders";

    /// <summary>Proxy addresses, e.g. <c>10.0.0.5</c>.</summary>
    public string[] KnownProxies { get; set; } = [];

    /// <summary>Proxy networks in CIDR notation, e.g. <c>10.0.0.0/8</c>.</summary>
    public string[] KnownNetworks { get; set; } = [];
}

/// <summary>Configuration section <c>Framing</c>: who may embed the dashboard and the chart.</summary>
public sealed class FramingOptions
{
    public const string SectionName = "Framing";

    /// <summary>The CSP <c>frame-ancestors</c> sources, space-separated (<c>'self'</c>,
    /// <c>https://portal.example.org</c>); empty: no framing anywhere.</summary>
    public string Ancestors { get; set; } = "";
}
