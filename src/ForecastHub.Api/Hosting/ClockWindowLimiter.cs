using System.Threading.RateLimiting;

namespace ForecastHub.Api.Hosting;

/// <summary>
/// A fixed window of <c>permits</c> requests that opens at the first request after the previous
/// window closed, timed by the service clock. Unlike the framework's fixed window it knows when its
/// window closes, so a refusal carries the seconds actually left as its retry-after.
/// </summary>
internal sealed class ClockWindowLimiter(int permits, TimeSpan window, TimeProvider clock) : RateLimiter
{
    private static readonly RateLimitLease Granted = new WindowLease(true, null);

    private readonly Lock gate = new();
    private DateTimeOffset windowEnds = DateTimeOffset.MinValue;
    private DateTimeOffset lastUsed = clock.GetUtcNow();
    private int used;

    public override TimeSpan? IdleDuration
    {
        get
        {
            lock (gate)
            {
                var now = clock.GetUtcNow();
                // A partition whose window has closed holds nothing worth keeping.
                return now >= windowEnds ? now - lastUsed : null;
            }
        }
    }

    public override RateLimiterStatistics? GetStatistics()
    {
        lock (gate)
        {
            return new RateLimiterStatistics { CurrentAvailablePermits = clock.GetUtcNow() >= windowEnds ? permits : permits - used };
        }
    }

    protected override RateLimitLease AttemptAcquireCore(int permitCount)
    {
        lock (gate)
        {
            var now = clock.GetUtcNow();
            lastUsed = now;
            if (now >= windowEnds)
            {
                windowEnds = now + window;
                used = 0;
            }
            if (permitCount == 0 || used + permitCount <= permits)
            {
                used += permitCount;
                return Granted;
            }
            return new WindowLease(false, windowEnds - now);
        }
    }

    protected override ValueTask<RateLimitLease> AcquireAsyncCore(int permitCount, CancellationToken cancellationToken) =>
        ValueTask.FromResult(AttemptAcquireCore(permitCount));

    private sealed class WindowLease(bool acquired, TimeSpan? retryAfter) : RateLimitLease
    {
        public override bool IsAcquired { get; } = acquired;

        public override IEnumerable<string> MetadataNames => retryAfter is null ? [] : [MetadataName.RetryAfter.Name];

        public override bool TryGetMetadata(string metadataName, out object? metadata)
        {
            metadata = retryAfter is { } wait && metadataName == MetadataName.RetryAfter.Name ? wait : null;
            return metadata is not null;
        }
    }
}
