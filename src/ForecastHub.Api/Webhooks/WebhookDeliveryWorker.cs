using ForecastHub.Storage.Webhooks;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Webhooks;

/// <summary>
/// Sends what the outbox holds: every pending delivery that is due, a few at a time, each
/// attempt's outcome stored before the next (delivered, retried later per <see cref="DeliveryBackoff"/>,
/// or given up). It sleeps until the next delivery is due or new events are queued, and picks up
/// whatever was pending when the service last stopped.
/// </summary>
public sealed partial class WebhookDeliveryWorker(
    IWebhookStore store,
    WebhookSender sender,
    IOptions<WebhookOptions> options,
    TimeProvider clock,
    ILogger<WebhookDeliveryWorker> logger) : BackgroundService
{
    private const int BatchSize = 32;
    private const int Parallelism = 4;

    // Looks again at least this often, so deliveries queued by another process are not left waiting.
    private static readonly TimeSpan MaxSleep = TimeSpan.FromMinutes(1);

    private readonly SemaphoreSlim wake = new(0, 1);

    // Long enough for a whole batch at the send timeout, so no other node takes a delivery still being sent.
    private TimeSpan ClaimFor => TimeSpan.FromSeconds(options.Value.TimeoutSeconds) * (BatchSize / Parallelism + 1);
    private TaskCompletionSource attemptRecorded = new(TaskCreationOptions.RunContinuationsAsynchronously);

    /// <summary>Completes when the next delivery attempt's outcome has been stored, so callers await work instead of polling.</summary>
    public Task WhenAttemptRecordedAsync() => Volatile.Read(ref attemptRecorded).Task;

    /// <summary>Called when events were queued, so they go out now rather than at the next look.</summary>
    public void Wake()
    {
        try
        {
            wake.Release();
        }
        catch (SemaphoreFullException)
        {
            // Already woken.
        }
    }

    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        await Task.Yield();
        while (!stoppingToken.IsCancellationRequested)
        {
            try
            {
                var now = clock.GetUtcNow();
                var due = await store.DueAsync(now, now + ClaimFor, BatchSize, stoppingToken);
                await Parallel.ForEachAsync(due, new ParallelOptions { MaxDegreeOfParallelism = Parallelism, CancellationToken = stoppingToken },
                    async (delivery, token) => await DeliverAsync(delivery, token));
                if (due.Count == BatchSize)
                {
                    continue;
                }

                await SleepAsync(await store.NextDueAsync(stoppingToken), stoppingToken);
            }
            catch (OperationCanceledException) when (stoppingToken.IsCancellationRequested)
            {
                return;
            }
#pragma warning disable CA1031 // A storage hiccup must not stop deliveries for good; the next look retries.
            catch (Exception error)
#pragma warning restore CA1031
            {
                LogLoopFailed(logger, error);
                await SleepAsync(clock.GetUtcNow() + MaxSleep, stoppingToken);
            }
        }
    }

    private async Task DeliverAsync(DueDelivery due, CancellationToken cancellationToken)
    {
        var result = await sender.SendAsync(due, cancellationToken);
        var now = clock.GetUtcNow();
        var delivery = due.Delivery;
        DeliveryAttempt attempt;
        if (result.Delivered)
        {
            attempt = new DeliveryAttempt(DeliveryStatus.Delivered, now, null, result.StatusCode, null);
        }
        else if (DeliveryBackoff.NextAttempt(delivery.CreatedAt, delivery.Attempts + 1, now, TimeSpan.FromSeconds(options.Value.FirstRetrySeconds)) is { } next)
        {
            attempt = new DeliveryAttempt(DeliveryStatus.Pending, now, next, result.StatusCode, result.Error);
            LogRetry(logger, delivery.MessageId, delivery.WebhookId, delivery.Attempts + 1, next, result.Error);
        }
        else
        {
            attempt = new DeliveryAttempt(DeliveryStatus.Failed, now, null, result.StatusCode,
                $"Given up after {delivery.Attempts + 1} attempts over {DeliveryBackoff.GiveUpAfter.TotalHours:0} h; last: {result.Error}");
            LogGivenUp(logger, delivery.MessageId, delivery.WebhookId, delivery.Attempts + 1);
        }

        // CancellationToken.None: an attempt that was made is recorded even while stopping, so it is not repeated needlessly.
        await store.RecordAttemptAsync(delivery.MessageId, attempt, CancellationToken.None);
        Interlocked.Exchange(ref attemptRecorded, new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously)).TrySetResult();
    }

    private async Task SleepAsync(DateTimeOffset? nextDue, CancellationToken stoppingToken)
    {
        var now = clock.GetUtcNow();
        var delay = nextDue is { } due ? due - now : MaxSleep;
        if (delay <= TimeSpan.Zero)
        {
            return;
        }
        if (delay > MaxSleep)
        {
            delay = MaxSleep;
        }

        using var either = CancellationTokenSource.CreateLinkedTokenSource(stoppingToken);
        var sleep = Task.Delay(delay, clock, either.Token);
        var woken = wake.WaitAsync(either.Token);
        await Task.WhenAny(sleep, woken);
        await either.CancelAsync();
        stoppingToken.ThrowIfCancellationRequested();
    }

    public override void Dispose()
    {
        wake.Dispose();
        base.Dispose();
    }

    [LoggerMessage(Level = LogLevel.Warning, Message = "Delivery {MessageId} to webhook {WebhookId} failed (attempt {Attempt}); next attempt at {NextAttemptAt}: {Error}")]
    private static partial void LogRetry(ILogger logger, string messageId, string webhookId, int attempt, DateTimeOffset nextAttemptAt, string? error);

    [LoggerMessage(Level = LogLevel.Error, Message = "Delivery {MessageId} to webhook {WebhookId} given up after {Attempts} attempts")]
    private static partial void LogGivenUp(ILogger logger, string messageId, string webhookId, int attempts);

    [LoggerMessage(Level = LogLevel.Error, Message = "The webhook delivery loop failed; it looks again shortly")]
    private static partial void LogLoopFailed(ILogger logger, Exception error);
}
