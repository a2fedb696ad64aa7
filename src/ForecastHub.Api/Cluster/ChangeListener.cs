using ForecastHub.Storage;
using ForecastHub.Storage.Postgres;
using ForecastHub.Storage.Postgres.Cluster;
using Microsoft.Extensions.Options;
using Npgsql;

namespace ForecastHub.Api.Cluster;

/// <summary>
/// Keeps one connection LISTENing on the change channel and applies every notice to this node's
/// caches. Each time it (re)connects it first drops every cache, since notices sent while it was
/// away are lost; so no node serves a site, model or key that another node changed, and a change
/// is honoured as soon as its notice arrives (milliseconds after the commit). With SQLite there is
/// one node and nothing to listen to, and it ends at once.
/// </summary>
public sealed partial class ChangeListener(
    IOptions<StorageOptions> storage, IServiceProvider services, NodeCaches caches, TimeProvider clock, ILogger<ChangeListener> logger)
    : BackgroundService
{
    private readonly TaskCompletionSource listening = new(TaskCreationOptions.RunContinuationsAsynchronously);

    /// <summary>Completes once the first LISTEN is in place.</summary>
    public Task WhenListeningAsync() => listening.Task;

    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        if (!storage.Value.IsPostgres)
        {
            return;
        }

        var database = services.GetRequiredService<PostgresDatabase>();
        while (!stoppingToken.IsCancellationRequested)
        {
            try
            {
                await using var connection = await database.OpenAsync(stoppingToken);
                connection.Notification += OnNotification;
                await using (var listen = new NpgsqlCommand($"LISTEN {PostgresDatabase.ChangeChannel};", connection))
                {
                    await listen.ExecuteNonQueryAsync(stoppingToken);
                }

                caches.ForgetAll();
                listening.TrySetResult();
                while (true)
                {
                    await connection.WaitAsync(stoppingToken);
                }
            }
            catch (OperationCanceledException) when (stoppingToken.IsCancellationRequested)
            {
                return;
            }
#pragma warning disable CA1031 // A lost connection is retried; until then the caches were dropped on reconnect.
            catch (Exception error)
#pragma warning restore CA1031
            {
                LogListenFailed(logger, error);
                caches.ForgetAll();
                await Task.Delay(TimeSpan.FromSeconds(1), clock, stoppingToken).ConfigureAwait(ConfigureAwaitOptions.SuppressThrowing);
            }
        }
    }

    private void OnNotification(object sender, NpgsqlNotificationEventArgs e)
    {
        if (ChangeNotice.Parse(e.Payload) is { } notice)
        {
            caches.Apply(notice);
        }
    }

    [LoggerMessage(Level = LogLevel.Warning, Message = "Listening for changes made by other nodes failed; caches dropped, reconnecting")]
    private static partial void LogListenFailed(ILogger logger, Exception error);
}
