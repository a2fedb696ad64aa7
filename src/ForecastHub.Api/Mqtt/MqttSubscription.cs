using System.Buffers;
using System.Security.Claims;
using System.Text.Json;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Metrics;
using ForecastHub.Api.Observations;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.Extensions.Options;
using MQTTnet;
using MQTTnet.Packets;
using MQTTnet.Protocol;

namespace ForecastHub.Api.Mqtt;

/// <summary>What the subscription is doing, for <c>/health/ready</c> and the logs.</summary>
public sealed class MqttSubscriptionState
{
    private readonly Lock gate = new();

    public string State { get; private set; } = "off";

    public string? LastError { get; private set; }

    public DateTimeOffset? Since { get; private set; }

    internal void Set(string state, DateTimeOffset at, string? error = null)
    {
        lock (gate)
        {
            State = state;
            Since = at;
            LastError = error ?? (state == "connected" ? null : LastError);
        }
    }
}

/// <summary>
/// The optional MQTT subscription (<c>Mqtt:Server</c>): a message on <c>PREFIX/sites/SITE/observations</c>
/// carries the JSON body of the HTTP post and an MQTT 5 user property <c>authorization: Bearer KEY</c>;
/// it goes through the HTTP ingest path itself (<see cref="ObservationsEndpoints.IngestAsync"/>) with the
/// same key rules, and the answer body (the HTTP answer, or its problem) is published to
/// <c>.../observations/outcome</c> with the message's correlation data. A message is acknowledged only
/// after it is stored, so a crash means redelivery, and a redelivered message is counted as duplicates.
/// The connection is retried with doubling waits; the broker's state never affects the HTTP side.
/// </summary>
public sealed partial class MqttSubscription(
    IOptions<MqttOptions> options,
    MqttSubscriptionState state,
    IServiceScopeFactory scopes,
    TimeProvider clock,
    ILogger<MqttSubscription> logger) : BackgroundService
{
    private const string AuthorizationProperty = "authorization";
    private static readonly JsonSerializerOptions Json = new(JsonSerializerDefaults.Web);

    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        var settings = options.Value;
        if (!settings.Enabled)
        {
            return;
        }
        var (host, port) = settings.Endpoint(out _)!.Value;
        var factory = new MqttClientFactory();
        using var client = factory.CreateMqttClient();
        client.ApplicationMessageReceivedAsync += e =>
        {
            // Acknowledged after the work, so a message is redelivered when the service dies before storing it.
            e.AutoAcknowledge = false;
            return HandleAsync(client, e, settings.TopicPrefix, stoppingToken);
        };
        var builder = new MqttClientOptionsBuilder()
            .WithTcpServer(host, port)
            .WithProtocolVersion(MQTTnet.Formatter.MqttProtocolVersion.V500)
            .WithClientId($"forecasthub-{Environment.MachineName}-{Environment.ProcessId}")
            .WithCleanStart(true)
            .WithTimeout(TimeSpan.FromSeconds(10));
        if (settings.Username.Length > 0)
        {
            builder = builder.WithCredentials(settings.Username, settings.Password);
        }
        var connectOptions = builder.Build();
        var topic = $"{settings.TopicPrefix}/sites/+/observations";
        var delay = TimeSpan.FromSeconds(1);
        while (!stoppingToken.IsCancellationRequested)
        {
            try
            {
                if (!client.IsConnected)
                {
                    state.Set(state.State == "off" ? "connecting" : "reconnecting", clock.GetUtcNow());
                    await client.ConnectAsync(connectOptions, stoppingToken);
                    await client.SubscribeAsync(factory.CreateSubscribeOptionsBuilder()
                        .WithTopicFilter(f => f.WithTopic(topic).WithQualityOfServiceLevel(MqttQualityOfServiceLevel.AtLeastOnce))
                        .Build(), stoppingToken);
                    state.Set("connected", clock.GetUtcNow());
                    LogConnected(logger, host, port, topic);
                    delay = TimeSpan.FromSeconds(1);
                }
                // A ping notices a silent broker loss; between pings the client runs on its own.
                await Task.Delay(TimeSpan.FromSeconds(5), clock, stoppingToken);
                if (!await client.TryPingAsync(stoppingToken))
                {
                    throw new IOException("the broker did not answer a ping");
                }
            }
            catch (OperationCanceledException) when (stoppingToken.IsCancellationRequested)
            {
                break;
            }
#pragma warning disable CA1031 // Any broker or network failure means: wait, then connect again; the HTTP side carries on.
            catch (Exception error)
#pragma warning restore CA1031
            {
                state.Set("reconnecting", clock.GetUtcNow(), $"{error.GetType().Name}: {error.Message}");
                LogLost(logger, error.Message, delay.TotalSeconds);
                try
                {
                    await Task.Delay(delay, clock, stoppingToken);
                }
                catch (OperationCanceledException)
                {
                    break;
                }
                delay = TimeSpan.FromSeconds(Math.Min(delay.TotalSeconds * 2, settings.MaxReconnectDelaySeconds));
            }
        }
        if (client.IsConnected)
        {
            await client.DisconnectAsync(new MqttClientDisconnectOptionsBuilder().Build(), CancellationToken.None);
        }
    }

    private async Task HandleAsync(IMqttClient client, MqttApplicationMessageReceivedEventArgs e, string prefix, CancellationToken cancellationToken)
    {
        var message = e.ApplicationMessage;
        var siteId = SiteOf(message.Topic, prefix);
        if (siteId is not null)
        {
            int status;
            byte[] body;
            try
            {
                (status, body) = await IngestAsync(siteId, message, cancellationToken);
            }
#pragma warning disable CA1031 // Unacknowledged, the message comes again after a reconnect; the subscription carries on.
            catch (Exception error) when (error is not OperationCanceledException)
#pragma warning restore CA1031
            {
                LogIngestFailed(logger, error, siteId);
                return;
            }
            var outcome = new MqttApplicationMessageBuilder()
                .WithTopic($"{prefix}/sites/{siteId}/observations/outcome")
                .WithPayload(body)
                .WithContentType(status == StatusCodes.Status200OK ? "application/json" : "application/problem+json")
                .WithUserProperty("status", System.Text.Encoding.UTF8.GetBytes(status.ToString(System.Globalization.CultureInfo.InvariantCulture)).AsMemory())
                .WithQualityOfServiceLevel(MqttQualityOfServiceLevel.AtLeastOnce);
            if (message.CorrelationData is { Length: > 0 } correlation)
            {
                outcome = outcome.WithCorrelationData(correlation);
            }
            await client.PublishAsync(outcome.Build(), cancellationToken);
        }
        await e.AcknowledgeAsync(cancellationToken);
    }

    // The site of PREFIX/sites/SITE/observations; null for any other topic.
    private static string? SiteOf(string topic, string prefix)
    {
        var start = prefix.Length + "/sites/".Length;
        const string suffix = "/observations";
        return topic.Length > start + suffix.Length && topic.StartsWith(prefix + "/sites/", StringComparison.Ordinal)
            && topic.EndsWith(suffix, StringComparison.Ordinal) && topic.IndexOf('/', start) == topic.Length - suffix.Length
            ? topic[start..^suffix.Length]
            : null;
    }

    private async Task<(int Status, byte[] Body)> IngestAsync(string siteId, MqttApplicationMessage message, CancellationToken cancellationToken)
    {
        using var scope = scopes.CreateScope();
        var services = scope.ServiceProvider;
        var header = message.UserProperties?.FirstOrDefault(p => string.Equals(p.Name, AuthorizationProperty, StringComparison.OrdinalIgnoreCase))?.ReadValueAsString();
        const string prefix = "Bearer ";
        var identity = header is not null && header.StartsWith(prefix, StringComparison.OrdinalIgnoreCase)
            ? await services.GetRequiredService<IApiKeyVerifier>().VerifyAsync(header[prefix.Length..].Trim(), cancellationToken)
            : null;
        if (identity is null)
        {
            return Problem(StatusCodes.Status401Unauthorized, "Key required",
                "This message needs a key: send it as the MQTT 5 user property 'authorization: Bearer <key>'. A key that was sent is missing, mistyped or revoked.");
        }
        if (!MayIngest(identity, siteId))
        {
            return Problem(StatusCodes.Status403Forbidden, "Not allowed", "The key is valid but its scope does not allow this call.");
        }
        var payload = message.Payload.ToArray();
        if (payload.Length > ObservationsEndpoints.MaxBodyBytes)
        {
            return Problem(StatusCodes.Status413PayloadTooLarge, "Too large",
                $"The body is larger than {ObservationsEndpoints.MaxBodyBytes / (1024 * 1024)} MiB; send at most {ObservationsEndpoints.MaxReadings} readings per message.");
        }
        var result = await ObservationsEndpoints.IngestAsync(siteId, payload, isJson: true, new IngestQuery(), User(identity),
            services.GetRequiredService<IReadingStore>(), services.GetRequiredService<ISiteStore>(),
            services.GetRequiredService<ServiceMetrics>(), clock, cancellationToken);
        return result.Result switch
        {
            Ok<ObservationsAnswer> ok => (StatusCodes.Status200OK, JsonSerializer.SerializeToUtf8Bytes(ok.Value, Json)),
            ProblemHttpResult problem => (problem.StatusCode, JsonSerializer.SerializeToUtf8Bytes(problem.ProblemDetails, Json)),
            _ => throw new InvalidOperationException("The ingest path answered an unexpected result."),
        };
    }

    // The rule of the HTTP ingest policy: an admin key, or an ingest key for every site or for this one.
    private static bool MayIngest(ApiKeyIdentity identity, string siteId) =>
        identity.Scope == ApiKeyScopes.Admin
        || (identity.Scope == ApiKeyScopes.Ingest && (identity.SiteIds.Count == 0 || identity.SiteIds.Contains(siteId, StringComparer.Ordinal)));

    // The claims the HTTP key handler gives the same key.
    private static ClaimsPrincipal User(ApiKeyIdentity identity)
    {
        var claims = new List<Claim> { new(ApiKeyScopes.KeyIdClaim, identity.KeyId), new(ApiKeyScopes.ScopeClaim, identity.Scope) };
        claims.AddRange(identity.SiteIds.Select(s => new Claim(ApiKeyScopes.SiteClaim, s)));
        return new ClaimsPrincipal(new ClaimsIdentity(claims, "mqtt"));
    }

    private static (int, byte[]) Problem(int status, string title, string detail) =>
        (status, JsonSerializer.SerializeToUtf8Bytes(new Microsoft.AspNetCore.Mvc.ProblemDetails { Status = status, Title = title, Detail = detail }, Json));

    [LoggerMessage(Level = LogLevel.Information, Message = "MQTT subscription connected to {Host}:{Port}, topic {Topic}")]
    private static partial void LogConnected(ILogger logger, string host, int port, string topic);

    [LoggerMessage(Level = LogLevel.Error, Message = "MQTT message for site {SiteId} could not be stored; it stays unacknowledged")]
    private static partial void LogIngestFailed(ILogger logger, Exception error, string siteId);

    [LoggerMessage(Level = LogLevel.Warning, Message = "MQTT broker not reachable ({Error}); next attempt in {Seconds} s")]
    private static partial void LogLost(ILogger logger, string error, double seconds);
}
