namespace ForecastHub.Api.Webhooks;

/// <summary>
/// When a failed delivery is tried again: <c>Webhooks:FirstRetrySeconds</c> (1 minute) after the
/// first failure, then doubling (2, 4, 8 ... minutes), with the last attempt at 24 hours after the
/// event was queued; a delivery still failing then is given up.
/// </summary>
public static class DeliveryBackoff
{
    public static readonly TimeSpan GiveUpAfter = TimeSpan.FromHours(24);

    /// <summary>The next attempt after <paramref name="attemptsMade"/> failed ones (the latest at
    /// <paramref name="now"/>), or null when the delivery is to be given up.</summary>
    public static DateTimeOffset? NextAttempt(DateTimeOffset queuedAt, int attemptsMade, DateTimeOffset now, TimeSpan firstRetry)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(attemptsMade, 1);
        var deadline = queuedAt + GiveUpAfter;
        if (now >= deadline)
        {
            return null;
        }
        // 2^20 minutes is far beyond the deadline; the shift stays small.
        var delay = firstRetry * (1L << Math.Min(attemptsMade - 1, 20));
        var next = now + delay;
        return next < deadline ? next : deadline;
    }
}
