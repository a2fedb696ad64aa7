using System.Net;
using Microsoft.AspNetCore.HttpOverrides;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Http;

/// <summary>CORS for configured origins, forwarded headers from configured proxies only, and the
/// options behind the framing policy of <see cref="Hosting.SecurityHeaders"/>.</summary>
public static class HttpConventions
{
    /// <summary>Response headers a browser page on another origin may read.</summary>
    public static readonly string[] ExposedHeaders = ["ETag", "Link", "Location", "Retry-After", "Content-Disposition"];

    public static IServiceCollection AddForecastHubHttpConventions(this IServiceCollection services)
    {
        services.AddOptions<CorsOptions>().BindConfiguration(CorsOptions.SectionName)
            .Validate(o => (o.Origins ?? []).All(IsOrigin), "Cors:Origins must be origins such as https://dash.example.org (scheme, host, optional port; no path).")
            .ValidateOnStart();
        services.AddOptions<ProxyOptions>().BindConfiguration(ProxyOptions.SectionName)
            .Validate(o => o.KnownProxies.All(p => IPAddress.TryParse(p, out _)), "ForwardedHeaders:KnownProxies must be IP addresses.")
            .Validate(o => o.KnownNetworks.All(n => System.Net.IPNetwork.TryParse(n, out _)), "ForwardedHeaders:KnownNetworks must be networks in CIDR notation, e.g. 10.0.0.0/8.")
            .ValidateOnStart();
        services.AddOptions<FramingOptions>().BindConfiguration(FramingOptions.SectionName)
            .Validate(o => (o.Ancestors ?? "").Split(' ', StringSplitOptions.RemoveEmptyEntries).All(IsFrameSource),
                "Framing:Ancestors must be space-separated sources: 'self', 'none', or origins such as https://portal.example.org.")
            .ValidateOnStart();
        services.AddCors();
        return services;
    }

    /// <summary>Forwarded headers first (so logs and the per-address rate limit see the real client),
    /// only from configured proxies; without any, the headers are ignored.</summary>
    public static WebApplication UseForwardedHeadersFromKnownProxies(this WebApplication app)
    {
        ArgumentNullException.ThrowIfNull(app);
        var proxies = app.Services.GetRequiredService<IOptions<ProxyOptions>>().Value;
        if (proxies.KnownProxies.Length == 0 && proxies.KnownNetworks.Length == 0)
        {
            return app;
        }

        var options = new ForwardedHeadersOptions
        {
            ForwardedHeaders = ForwardedHeaders.XForwardedFor | ForwardedHeaders.XForwardedProto,
            // Each trusted proxy in a chain strips one entry; the first untrusted address is the client.
            ForwardLimit = null,
        };
        options.KnownProxies.Clear();
        options.KnownIPNetworks.Clear();
        foreach (var proxy in proxies.KnownProxies)
        {
            options.KnownProxies.Add(IPAddress.Parse(proxy));
        }

        foreach (var network in proxies.KnownNetworks)
        {
            options.KnownIPNetworks.Add(System.Net.IPNetwork.Parse(network));
        }

        app.UseForwardedHeaders(options);
        return app;
    }

    /// <summary>Answers preflights and adds CORS headers for the configured origins; nothing when none are.</summary>
    public static WebApplication UseConfiguredCors(this WebApplication app)
    {
        ArgumentNullException.ThrowIfNull(app);
        var origins = app.Services.GetRequiredService<IOptions<CorsOptions>>().Value.Origins;
        if (origins.Length == 0)
        {
            return app;
        }

        app.UseCors(policy => policy
            .WithOrigins(origins)
            .WithMethods("GET", "POST", "PUT", "PATCH", "DELETE")
            .WithHeaders("Authorization", "Content-Type", "Accept", "If-None-Match")
            .WithExposedHeaders(ExposedHeaders)
            .SetPreflightMaxAge(TimeSpan.FromHours(1)));
        return app;
    }

    private static bool IsOrigin(string value) =>
        Uri.TryCreate(value, UriKind.Absolute, out var uri)
        && (uri.Scheme == Uri.UriSchemeHttps || uri.Scheme == Uri.UriSchemeHttp)
        && uri.AbsolutePath == "/" && !value.EndsWith('/') && uri.Query.Length == 0 && uri.UserInfo.Length == 0;

    private static bool IsFrameSource(string value) => value is "'self'" or "'none'" || IsOrigin(value);
}
