using System.Buffers;
using System.Diagnostics;
using System.Net;
using System.Text;
using System.Text.Json;
using System.Threading.Channels;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;
using MQTTnet;
using MQTTnet.Formatter;
using MQTTnet.Packets;
using MQTTnet.Protocol;

namespace ForecastHub.Api.Tests.Mqtt;

/// <summary>The MQTT subscription against a real mosquitto on loopback: the same rules and storage as
/// the HTTP post, answers on the outcome topic, redelivery as duplicates, and a broker loss that HTTP
/// never notices.</summary>
public sealed class MqttIngestTests
{
    private static readonly TimeSpan Patience = ModelScenario.Patience;

    private static ApiFactory Factory(MosquittoBroker broker) => new()
    {
        Settings = new Dictionary<string, string?> { ["Mqtt:Server"] = broker.Server, ["Mqtt:TopicPrefix"] = "farm" },
    };

    /// <summary>A logger's client: publishes with MQTT 5 user properties and collects the outcomes.</summary>
    private sealed class Logger : IAsyncDisposable
    {
        private readonly IMqttClient client = new MqttClientFactory().CreateMqttClient();
        private readonly Channel<(string Status, JsonElement Body)> outcomes = Channel.CreateUnbounded<(string, JsonElement)>();

        public static async Task<Logger> ConnectAsync(MosquittoBroker broker)
        {
            var logger = new Logger();
            logger.client.ApplicationMessageReceivedAsync += e =>
            {
                var status = e.ApplicationMessage.UserProperties?.FirstOrDefault(p => p.Name == "status")?.ReadValueAsString() ?? "";
                var body = JsonDocument.Parse(e.ApplicationMessage.Payload.ToArray()).RootElement.Clone();
                logger.outcomes.Writer.TryWrite((status, body));
                return Task.CompletedTask;
            };
            await logger.client.ConnectAsync(new MqttClientOptionsBuilder().WithTcpServer("127.0.0.1", broker.Port)
                .WithProtocolVersion(MqttProtocolVersion.V500).Build());
            await logger.client.SubscribeAsync(new MqttClientFactory().CreateSubscribeOptionsBuilder()
                .WithTopicFilter(f => f.WithTopic("farm/sites/+/observations/outcome").WithQualityOfServiceLevel(MqttQualityOfServiceLevel.AtLeastOnce)).Build());
            return logger;
        }

        public async Task<(string Status, JsonElement Body)> PublishAsync(string siteId, string body, string? key)
        {
            var message = new MqttApplicationMessageBuilder().WithTopic($"farm/sites/{siteId}/observations")
                .WithPayload(Encoding.UTF8.GetBytes(body)).WithQualityOfServiceLevel(MqttQualityOfServiceLevel.AtLeastOnce);
            if (key is not null)
            {
                message = message.WithUserProperty("authorization", Encoding.UTF8.GetBytes($"Bearer {key}").AsMemory());
            }
            await client.PublishAsync(message.Build());
            using var timeout = new CancellationTokenSource(Patience);
            return await outcomes.Reader.ReadAsync(timeout.Token);
        }

        public async ValueTask DisposeAsync()
        {
            await client.DisconnectAsync();
            client.Dispose();
        }
    }

    private static string Body(int hours) =>
        JsonSerializer.Serialize(Some.ReadingsBody(Some.HourlyReadings(hours, ApiFactory.Now), "C"));

    private static async Task<JsonElement> ReadyAsync(HttpClient client) =>
        await client.GetJsonAsync("/health/ready");

    private static async Task WaitForStateAsync(ApiFactory factory, HttpClient client, string state)
    {
        var deadline = Stopwatch.StartNew();
        while ((await ReadyAsync(client)).GetProperty("mqtt").GetProperty("state").GetString() != state)
        {
            Assert.True(deadline.Elapsed < Patience, $"the subscription did not become {state}");
            // The subscription's waits run on the fake clock; the broker and the sockets are real.
            factory.Clock.Advance(TimeSpan.FromSeconds(10));
            await Task.Delay(50);
        }
    }

    [Fact]
    public async Task AMessageIsStoredByTheHttpRulesAndItsRedeliveryIsAHarmlessDuplicate()
    {
        await using var broker = await MosquittoBroker.StartAsync();
        await using var factory = Factory(broker);
        using var client = factory.CreateAdminClient();
        (await client.CreateSite()).Dispose();
        await WaitForStateAsync(factory, client, "connected");
        await using var logger = await Logger.ConnectAsync(broker);

        var (status, first) = await logger.PublishAsync("orchard-1", Body(24), ApiFactory.AdminKey);
        var (_, again) = await logger.PublishAsync("orchard-1", Body(24), ApiFactory.AdminKey);
        var (badStatus, bad) = await logger.PublishAsync("orchard-1",
            """{"unit":"C","readings":[{"time":"2025-05-31T10:00:00","value":1}]}""", ApiFactory.AdminKey);

        Assert.Equal("200", status);
        Assert.Equal(24, first.GetProperty("accepted").GetInt32());
        Assert.Equal(24, again.GetProperty("duplicates").GetInt32());
        Assert.Equal(0, again.GetProperty("accepted").GetInt32());
        Assert.Equal("422", badStatus);
        Assert.Contains("has no UTC offset", bad.GetProperty("rejected")[0].GetProperty("reason").GetString(), StringComparison.Ordinal);
        Assert.Equal(24, (await client.AllReadings()).Count);
    }

    [Fact]
    public async Task AMessageWithoutAValidKeyOrForAnotherSiteIsRefusedAndNothingIsStored()
    {
        await using var broker = await MosquittoBroker.StartAsync();
        await using var factory = Factory(broker);
        using var client = factory.CreateAdminClient();
        (await client.CreateSite()).Dispose();
        (await client.CreateSite(Some.Site("orchard-2"))).Dispose();
        using var created = await client.PostAsync(new Uri("/api/v1/keys", UriKind.Relative),
            new StringContent("""{"scope":"ingest","siteIds":["orchard-2"],"label":"logger 2"}""", Encoding.UTF8, "application/json"));
        var ingestKey = JsonDocument.Parse(await created.Content.ReadAsStringAsync()).RootElement.GetProperty("key").GetString();
        await WaitForStateAsync(factory, client, "connected");
        await using var logger = await Logger.ConnectAsync(broker);

        var (noKey, _) = await logger.PublishAsync("orchard-1", Body(3), key: null);
        var (wrongKey, _) = await logger.PublishAsync("orchard-1", Body(3), "not-a-key");
        var (otherSite, problem) = await logger.PublishAsync("orchard-1", Body(3), ingestKey);
        var (ownSite, answer) = await logger.PublishAsync("orchard-2", Body(3), ingestKey);

        Assert.Equal("401", noKey);
        Assert.Equal("401", wrongKey);
        Assert.Equal("403", otherSite);
        Assert.Equal("Not allowed", problem.GetProperty("title").GetString());
        Assert.Equal("200", ownSite);
        Assert.Equal(3, answer.GetProperty("accepted").GetInt32());
        Assert.Empty(await client.AllReadings("orchard-1"));
    }

    [Fact]
    public async Task ABrokerLossLeavesHttpReadyAndWorkingAndTheSubscriptionReconnects()
    {
        await using var broker = await MosquittoBroker.StartAsync();
        await using var factory = Factory(broker);
        using var client = factory.CreateAdminClient();
        (await client.CreateSite()).Dispose();
        await WaitForStateAsync(factory, client, "connected");

        await broker.StopAsync();
        await WaitForStateAsync(factory, client, "reconnecting");
        using var ready = await client.GetAsync(new Uri("/health/ready", UriKind.Relative));
        using var posted = await client.PostReadings(Some.HourlyReadings(5, ApiFactory.Now));
        await broker.RestartAsync();
        await WaitForStateAsync(factory, client, "connected");
        await using var logger = await Logger.ConnectAsync(broker);
        var (status, answer) = await logger.PublishAsync("orchard-1", Body(5), ApiFactory.AdminKey);

        Assert.Equal(HttpStatusCode.OK, ready.StatusCode);
        Assert.Equal(HttpStatusCode.OK, posted.StatusCode);
        Assert.Equal("200", status);
        // The readings the HTTP post stored while the broker was away: the same store answers for both paths.
        Assert.Equal(5, answer.GetProperty("duplicates").GetInt32());
        Assert.Equal(0, answer.GetProperty("accepted").GetInt32());
    }

    [Fact]
    public async Task WithoutAServerTheSubscriptionIsOffAndReadinessSaysSo()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();

        var ready = await ReadyAsync(client);

        Assert.Equal("off", ready.GetProperty("mqtt").GetProperty("state").GetString());
    }
}
