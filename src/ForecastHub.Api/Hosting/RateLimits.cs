using System.Globalization;
using System.Threading.RateLimiting;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Problems;
using Microsoft.AspNetCore.RateLimiting;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Hosting;

/// <summary>Configuration section <c>RateLimiting</c>: fixed windows, one per key.</summary>
public sealed class RateLimitOptions
{
    public const string SectionName = "RateLimiting";

    public bool Enabled { get; set; } = true;

    /// <summary>Requests one key may make per window.</summary>
    public int PermitsPerWindow { get; set; } = 600;

    /// <summary>Requests per window from one client address that sends no valid key.</summary>
    public int AnonymousPermitsPerWindow { get; set; } = 120;

    public int WindowSeconds { get; set; } = 60;
}

public static class RateLimits
{
    /// <summary>A fixed window per key id (per client address without a valid key); health probes
    /// and metrics scrapes are never limited. Rejections are 429 problems whose Retry-After is the
    /// whole seconds left in the window.</summary>
    public static IServiceCollection AddForecastHubRateLimits(this IServiceCollection services)
    {
        services.AddOptions<RateLimitOptions>()
            .BindConfiguration(RateLimitOptions.SectionName)
            .Validate(o => o.PermitsPerWindow > 0, "RateLimiting:PermitsPerWindow must be positive.")
            .Validate(o => o.AnonymousPermitsPerWindow > 0, "RateLimiting:AnonymousPermitsPerWindow must be positive.")
            .Validate(o => o.WindowSeconds is > 0 and <= 86_400, "RateLimiting:WindowSeconds must be from 1 to 86400.")
            .ValidateOnStart();
        services.AddRateLimiter(limiter =>
        {
            limiter.RejectionStatusCode = StatusCodes.Status429TooManyRequests;
            limiter.GlobalLimiter = PartitionedRateLimiter.Create<HttpContext, string>(Partition);
            limiter.OnRejected = Reject;
        });
        return services;
    }

    private static RateLimitPartition<string> Partition(HttpContext context)
    {
        var options = context.RequestServices.GetRequiredService<IOptionsMonitor<RateLimitOptions>>().CurrentValue;
        var path = context.Request.Path;
        if (!options.Enabled || path.StartsWithSegments("/health") || path.StartsWithSegments("/metrics"))
        {
            return RateLimitPartition.GetNoLimiter("unlimited");
        }
        var keyId = context.User.FindFirst(ApiKeyScopes.KeyIdClaim)?.Value;
        var (partition, permits) = keyId is not null
            ? ("key:" + keyId, options.PermitsPerWindow)
            : ("address:" + context.Connection.RemoteIpAddress, options.AnonymousPermitsPerWindow);
        var clock = context.RequestServices.GetRequiredService<TimeProvider>();
        return RateLimitPartition.Get(partition, _ => new ClockWindowLimiter(permits, TimeSpan.FromSeconds(options.WindowSeconds), clock));
    }

    private static async ValueTask Reject(OnRejectedContext rejected, CancellationToken cancellationToken)
    {
        var context = rejected.HttpContext;
        var retryAfter = rejected.Lease.TryGetMetadata(MetadataName.RetryAfter, out var wait)
            ? Math.Max(1, (int)Math.Ceiling(wait.TotalSeconds))
            : context.RequestServices.GetRequiredService<IOptionsMonitor<RateLimitOptions>>().CurrentValue.WindowSeconds;
        context.Response.Headers.RetryAfter = retryAfter.ToString(CultureInfo.InvariantCulture);
        await MiddlewareProblems.WriteAsync(context, StatusCodes.Status429TooManyRequests, "Too many requests",
            $"This key (or, without a key, this address) has used its requests for the current window; retry after {retryAfter} s.").ConfigureAwait(false);
    }
}
