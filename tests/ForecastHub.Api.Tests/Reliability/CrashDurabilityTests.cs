using System.Collections.Concurrent;
using System.Net;
using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Api.Tests.Reliability;

/// <summary>An answer of 200 means the readings are durable: the service is killed with SIGKILL in
/// the middle of ingesting, several times, and every acknowledged reading is there after restart.</summary>
[Trait("Category", "Process")]
public sealed class CrashDurabilityTests
{
    private const int Rounds = 3;
    private const int BatchSize = 500;
    private static readonly DateTimeOffset Past = new(2020, 1, 1, 0, 0, 0, TimeSpan.Zero);

    [Fact]
    public async Task EveryAcknowledgedReadingSurvivesRepeatedSigkillMidIngest()
    {
        var path = TestFiles.NewDatabasePath();
        var acknowledged = new ConcurrentDictionary<int, bool>();
        var sent = new ConcurrentDictionary<int, bool>();
        var nextBatch = 0;
        try
        {
            for (var round = 0; round < Rounds; round++)
            {
                await using var service = await ServiceProcess.StartAsync(path);
                using var client = service.CreateAdminClient();
                if (round == 0)
                {
                    (await client.CreateSite()).Dispose();
                }
                else
                {
                    await AssertAcknowledgedPresent(client, acknowledged.Keys, sent.Keys);
                }

                // Two clients ingest until the service dies under them.
                var ackedThisRound = 0;
                using var enoughAcks = new SemaphoreSlim(0);
                var writers = Enumerable.Range(0, 2).Select(_ => Task.Run(async () =>
                {
                    while (true)
                    {
                        var batch = Interlocked.Increment(ref nextBatch) - 1;
                        sent[batch] = true;
                        try
                        {
                            using var response = await client.PostReadings(Batch(batch));
                            if (response.StatusCode != HttpStatusCode.OK)
                            {
                                throw new InvalidOperationException($"batch {batch}: {response.StatusCode}");
                            }
                            acknowledged[batch] = true;
                            if (Interlocked.Increment(ref ackedThisRound) == 5)
                            {
                                enoughAcks.Release();
                            }
                        }
                        catch (HttpRequestException)
                        {
                            return; // the process is gone
                        }
                        catch (TaskCanceledException)
                        {
                            return;
                        }
                    }
                })).ToArray();
                Assert.True(await enoughAcks.WaitAsync(TimeSpan.FromSeconds(120)), "five batches were not acknowledged within 120 s");
                // Kill at a varying moment inside a later request.
                await Task.Delay(13 * round);
                await service.KillAsync();
                await Task.WhenAll(writers);

                Assert.Equal("ok", IntegrityCheck(path));
            }

            await using var last = await ServiceProcess.StartAsync(path);
            using var reader = last.CreateAdminClient();
            await AssertAcknowledgedPresent(reader, acknowledged.Keys, sent.Keys);
            Assert.True(acknowledged.Count >= Rounds * 5, $"only {acknowledged.Count} batches acknowledged");
        }
        finally
        {
            TestFiles.DeleteDatabase(path);
        }
    }

    private static IEnumerable<(DateTimeOffset Time, double Value)> Batch(int batch) =>
        Enumerable.Range(0, BatchSize).Select(i => (Past.AddMinutes((batch * BatchSize) + i), Value(batch, i)));

    private static double Value(int batch, int i) => Math.Round(10 + (5 * Math.Sin((batch * BatchSize + i) / 100.0)), 3);

    // Acknowledged batches are complete; a batch cut off by the kill is all there or not there at all.
    private static async Task AssertAcknowledgedPresent(HttpClient client, ICollection<int> acknowledged, ICollection<int> sent)
    {
        var stored = (await client.AllReadings()).ToDictionary(
            r => DateTimeOffset.Parse(r.GetProperty("time").GetString()!, System.Globalization.CultureInfo.InvariantCulture),
            r => r.GetProperty("value").GetDouble());
        foreach (var batch in sent)
        {
            var present = Batch(batch).Count(r => stored.TryGetValue(r.Time, out var v) && v == r.Value);
            if (acknowledged.Contains(batch))
            {
                Assert.True(present == BatchSize, $"acknowledged batch {batch} has {present} of {BatchSize} readings");
            }
            else
            {
                Assert.True(present is 0 or BatchSize, $"unacknowledged batch {batch} is torn: {present} of {BatchSize}");
            }
        }
    }

    private static string IntegrityCheck(string path)
    {
        using var connection = new SqliteConnection(new SqliteConnectionStringBuilder { DataSource = path, Pooling = false }.ToString());
        connection.Open();
        using var command = connection.CreateCommand();
        command.CommandText = "PRAGMA integrity_check;";
        return (string)command.ExecuteScalar()!;
    }
}
