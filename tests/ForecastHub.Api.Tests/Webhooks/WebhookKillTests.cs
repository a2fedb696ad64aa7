using System.Net.Http.Json;
using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;

namespace ForecastHub.Api.Tests.Webhooks;

/// <summary>A pending delivery survives SIGKILL of the service: the next process sends it, with the same id.</summary>
public sealed class WebhookKillTests
{
    [Fact]
    public async Task APendingDeliverySurvivesKillNineAndIsDeliveredByTheNextProcess()
    {
        await using var receiver = await WebhookReceiver.StartAsync();
        receiver.AnswerWith = 500;
        var path = TestFiles.NewDatabasePath();
        try
        {
            // The event is queued in-process on a clock set to real time, so the child processes (real clock) find it due.
            string webhookId, secret;
            ReceivedDelivery first;
            await using (var setup = new ApiFactory
            {
                DatabasePath = path,
                KeepDatabase = true,
                Settings = new Dictionary<string, string?> { ["Webhooks:AllowPrivateNetworks"] = "true", ["Webhooks:FirstRetrySeconds"] = "1" },
            })
            {
                setup.Clock.SetUtcNow(DateTimeOffset.UtcNow);
                using var admin = setup.CreateAdminClient();
                (webhookId, secret) = await admin.CreateWebhookAsync(receiver.Url);
                var recorded = setup.Deliveries().WhenAttemptRecordedAsync();
                await setup.MakeSiteSensorSuspectAsync(admin, "orchard-1");
                first = await receiver.NextAsync(ModelScenario.Patience);
                await recorded.WaitAsync(ModelScenario.Patience);
            }

            string[] childArgs = ["--Webhooks:AllowPrivateNetworks=true", "--Webhooks:FirstRetrySeconds=1"];
            await using (var doomed = await ServiceProcess.StartAsync(path, extraArgs: childArgs))
            {
                // Killed the moment its attempt reaches the receiver: its outcome may or may not have been stored.
                var duringKill = await receiver.NextAsync(ModelScenario.Patience);
                await doomed.KillAsync();
                Assert.Equal(first.Id, duringKill.Id);
            }

            receiver.AnswerWith = 200;
            await using var survivor = await ServiceProcess.StartAsync(path, extraArgs: childArgs);
            ReceivedDelivery delivered;
            do
            {
                delivered = await receiver.NextAsync(ModelScenario.Patience);
            }
            while (delivered.AnsweredWith != 200);

            Assert.Equal(first.Id, delivered.Id);
            Assert.Equal(first.Body, delivered.Body);
            Assert.True(delivered.SignatureValidFor(secret));
            using var client = survivor.CreateAdminClient();
            var patience = System.Diagnostics.Stopwatch.StartNew();
            JsonElement log;
            while (true)
            {
                log = Assert.Single((await client.GetFromJsonAsync<JsonElement>($"api/v1/webhooks/{webhookId}/deliveries"))
                    .GetProperty("deliveries").EnumerateArray());
                if (log.GetProperty("status").GetString() != "pending" || patience.Elapsed > ModelScenario.Patience)
                {
                    break;
                }
                // The survivor stores the outcome just after the receiver answered; a real process has no clock to advance, so poll its log.
                await Task.Delay(50);
            }
            Assert.Equal("delivered", log.GetProperty("status").GetString());
            Assert.True(log.GetProperty("attempts").GetInt32() >= 2);
        }
        finally
        {
            TestFiles.DeleteDatabase(path);
        }
    }
}
