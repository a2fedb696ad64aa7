using System.Net;
using System.Net.Http.Json;
using System.Net.Sockets;
using System.Text;
using ForecastHub.Api.Tests.Infrastructure;

namespace ForecastHub.Api.Tests.Reliability;

/// <summary>The built service on real Kestrel over loopback.</summary>
[Trait("Category", "Process")]
public sealed class KestrelTests
{
    private static readonly DateTimeOffset Past = new(2024, 3, 1, 0, 0, 0, TimeSpan.Zero);

    [Fact]
    public async Task ServiceOnLoopbackStoresCsvAndAnswersProblemsForBadRequests()
    {
        var path = TestFiles.NewDatabasePath();
        try
        {
            await using var service = await ServiceProcess.StartAsync(path);
            using var client = service.CreateAdminClient();
            using var created = await client.CreateSite();
            Assert.Equal(HttpStatusCode.Created, created.StatusCode);

            using var posted = await client.PostRaw(Some.Csv(Some.HourlyReadings(24, Past)), "text/csv");
            using var refused = await client.PostRaw("time;value\r\n", "text/csv");
            var raw = await RawRequest(service.Port, "GET /api/v1/sites/orchard-1%00/observations HTTP/1.1\r\nHost: x\r\n\r\n");

            Assert.Equal(24, (await posted.Json()).Count("accepted"));
            Assert.Equal(24, (await client.AllReadings()).Count);
            await ProblemAssert.IsProblem(refused, HttpStatusCode.BadRequest);
            Assert.StartsWith("HTTP/1.1 4", raw, StringComparison.Ordinal);
            var live = await client.GetFromJsonAsync<System.Text.Json.JsonElement>(new Uri("health/live", UriKind.Relative));
            Assert.Equal("live", live.GetProperty("status").GetString());
        }
        finally
        {
            TestFiles.DeleteDatabase(path);
        }
    }

    private static async Task<string> RawRequest(int port, string request)
    {
        using var tcp = new TcpClient();
        await tcp.ConnectAsync(IPAddress.Loopback, port);
        var stream = tcp.GetStream();
        await stream.WriteAsync(Encoding.ASCII.GetBytes(request));
        var buffer = new byte[4096];
        var read = await stream.ReadAsync(buffer);
        return Encoding.ASCII.GetString(buffer, 0, read);
    }
}
