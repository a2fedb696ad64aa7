using System.Net;
using System.Net.Sockets;
using System.Text;
using ForecastHub.Api.Tests.Infrastructure;

namespace ForecastHub.Api.Tests.Observations;

/// <summary>Hostile input that only real Kestrel sees (bytes on a socket): broken chunk framing, a
/// trickled body, chunked bodies against the size limit, and invalid UTF-8 inside JSON. None of it
/// is a 5xx, and nothing stored changes.</summary>
[Trait("Category", "Process")]
public sealed class HostileTransportTests(HostileTransportTests.Service fixture) : IClassFixture<HostileTransportTests.Service>
{
    private const string T = "2025-05-31T10:00:00Z";
    private readonly ServiceProcess service = fixture.Process;

    /// <summary>One child process with site orchard-1 for the whole class; no test here stores a reading.</summary>
    public sealed class Service : IAsyncLifetime
    {
        private readonly string path = TestFiles.NewDatabasePath();

        public ServiceProcess Process { get; private set; } = null!;

        public async Task InitializeAsync()
        {
            Process = await ServiceProcess.StartAsync(path);
            using var client = Process.CreateAdminClient();
            using var created = await client.CreateSite();
            Assert.Equal(HttpStatusCode.Created, created.StatusCode);
        }

        public async Task DisposeAsync()
        {
            await Process.DisposeAsync();
            TestFiles.DeleteDatabase(path);
        }
    }

    public static TheoryData<string, byte[]> InvalidUtf8Bodies => new()
    {
        { "lone continuation byte in the time", Bytes("{\"readings\":[{\"time\":\"2025-05-31T10:00:00Z\x80\",\"value\":1}]}") },
        { "0xFF in the unit", Bytes("{\"unit\":\"\xFF\",\"readings\":[{\"time\":\"" + T + "\",\"value\":1}]}") },
        { "truncated two-byte sequence in a row unit", Bytes("{\"readings\":[{\"time\":\"" + T + "\",\"value\":1,\"unit\":\"\xC3\"}]}") },
        { "overlong encoding of '/' in a property name", Bytes("{\"read\xC0\xAFings\":[]}") },
        { "surrogate half encoded as UTF-8", Bytes("{\"readings\":[{\"time\":\"\xED\xA0\x80\",\"value\":1}]}") },
    };

    [Theory]
    [MemberData(nameof(InvalidUtf8Bodies))]
    public async Task InvalidUtf8InsideJsonIsABadRequest(string name, byte[] body)
    {
        using var client = service.CreateAdminClient();
        using var content = new ByteArrayContent(body);
        content.Headers.ContentType = new("application/json");

        using var response = await client.PostAsync(Some.Observations(), content);

        Assert.True(response.StatusCode == HttpStatusCode.BadRequest, $"{name}: {(int)response.StatusCode} {await response.Content.ReadAsStringAsync()}");
        await ProblemAssert.IsProblem(response, HttpStatusCode.BadRequest);
        Assert.Empty(await client.AllReadings());
    }

    [Fact]
    public async Task InvalidUtf8InSiteAndKeyBodiesIsABadRequest()
    {
        using var client = service.CreateAdminClient();
        foreach (var (route, body) in new[]
                 {
                     ("/api/v1/sites", Bytes("{\"id\":\"a\",\"name\":\"\xFF\",\"timeZone\":\"UTC\",\"cadence\":\"hourly\"}")),
                     ("/api/v1/keys", Bytes("{\"scope\":\"read\",\"label\":\"\xC3\"}")),
                 })
        {
            using var content = new ByteArrayContent(body);
            content.Headers.ContentType = new("application/json");
            using var response = await client.PostAsync(new Uri(route, UriKind.Relative), content);

            await ProblemAssert.IsProblem(response, HttpStatusCode.BadRequest);
        }
    }

    [Theory]
    [InlineData("chunk size is not hexadecimal", "zz\r\nabc\r\n0\r\n\r\n")]
    [InlineData("chunk longer than its size", "2\r\nabcdef\r\n0\r\n\r\n")]
    [InlineData("chunk without its line end", "3\r\nabcX0\r\n\r\n")]
    public async Task BrokenChunkFramingIsABadRequest(string name, string framing)
    {
        var answer = await RawExchange(
            "POST /api/v1/sites/orchard-1/observations HTTP/1.1\r\nHost: x\r\n" +
            $"Authorization: Bearer {ApiFactory.AdminKey}\r\nContent-Type: application/json\r\nTransfer-Encoding: chunked\r\n\r\n" + framing);

        Assert.True(answer.StartsWith("HTTP/1.1 400", StringComparison.Ordinal), $"{name}: {answer}");
        using var client = service.CreateAdminClient();
        Assert.Empty(await client.AllReadings());
    }

    [Fact]
    public async Task BodyTrickledAtOneBytePerSecondTimesOutWith408()
    {
        using var tcp = new TcpClient();
        await tcp.ConnectAsync(IPAddress.Loopback, service.Port);
        var stream = tcp.GetStream();
        var body = Bytes("{\"readings\":[{\"time\":\"" + T + "\",\"value\":1}]}");
        await stream.WriteAsync(Bytes(
            "POST /api/v1/sites/orchard-1/observations HTTP/1.1\r\nHost: x\r\n" +
            $"Authorization: Bearer {ApiFactory.AdminKey}\r\nContent-Type: application/json\r\nContent-Length: {body.Length}\r\n\r\n"));
        var answer = ReadAnswerAsync(stream);
        // One byte a second until the server answers; the minimum data rate (240 B/s after 5 s) answers long before the body ends.
        foreach (var b in body)
        {
            if (answer.IsCompleted)
            {
                break;
            }
            try
            {
                await stream.WriteAsync(new[] { b });
            }
            catch (IOException)
            {
                break;
            }
            await Task.WhenAny(answer, Task.Delay(TimeSpan.FromSeconds(1)));
        }

        var text = await answer.WaitAsync(TimeSpan.FromSeconds(60));
        Assert.True(text.StartsWith("HTTP/1.1 408", StringComparison.Ordinal), text);
        using var client = service.CreateAdminClient();
        Assert.Empty(await client.AllReadings());
    }

    [Fact]
    public async Task ChunkedBodyIsMeasuredByItsPayloadAgainstTheLimit()
    {
        const int limit = 8 * 1024 * 1024;
        // Small chunks: the payload is under 8 MiB, the payload with its framing is not.
        var payload = "{\"readings\":[{\"time\":\"" + T + "\",\"value\":1}],\"x\":1" + new string(' ', limit - 200) + "}";
        var under = Chunked(Bytes(payload), chunkSize: 16);
        var over = Chunked(Bytes(payload + new string(' ', 300)), chunkSize: 16);
        Assert.True(under.Length > limit);

        var accepted = await RawExchange(Head("application/json"), under);
        var refused = await RawExchange(Head("application/json"), over);

        Assert.False(accepted.StartsWith("HTTP/1.1 413", StringComparison.Ordinal), accepted);
        Assert.True(refused.StartsWith("HTTP/1.1 413", StringComparison.Ordinal), refused);
    }

    [Fact]
    public async Task AnswersCarryNoServerHeader()
    {
        var answer = await RawExchange("GET /health/live HTTP/1.1\r\nHost: x\r\n\r\n");

        Assert.StartsWith("HTTP/1.1 200", answer, StringComparison.Ordinal);
        Assert.DoesNotContain("\r\nServer:", answer, StringComparison.OrdinalIgnoreCase);
    }

    private static string Head(string contentType) =>
        "POST /api/v1/sites/orchard-1/observations HTTP/1.1\r\nHost: x\r\n" +
        $"Authorization: Bearer {ApiFactory.AdminKey}\r\nContent-Type: {contentType}\r\nTransfer-Encoding: chunked\r\n\r\n";

    private static byte[] Chunked(byte[] payload, int chunkSize)
    {
        var framed = new MemoryStream();
        for (var at = 0; at < payload.Length; at += chunkSize)
        {
            var length = Math.Min(chunkSize, payload.Length - at);
            framed.Write(Bytes($"{length:x}\r\n"));
            framed.Write(payload, at, length);
            framed.Write(Bytes("\r\n"));
        }
        framed.Write(Bytes("0\r\n\r\n"));
        return framed.ToArray();
    }

    private static byte[] Bytes(string text) => Encoding.Latin1.GetBytes(text);

    private Task<string> RawExchange(string request) => RawExchange(request, []);

    private async Task<string> RawExchange(string head, byte[] body)
    {
        using var tcp = new TcpClient();
        await tcp.ConnectAsync(IPAddress.Loopback, service.Port);
        var stream = tcp.GetStream();
        var answer = ReadAnswerAsync(stream);
        try
        {
            await stream.WriteAsync(Bytes(head));
            await stream.WriteAsync(body);
        }
        catch (IOException)
        {
            // The server may answer and close before the whole body is sent; its answer is what counts.
        }
        return await answer.WaitAsync(TimeSpan.FromSeconds(60));
    }

    // The status line and headers of the first answer (the body is not needed).
    private static async Task<string> ReadAnswerAsync(NetworkStream stream)
    {
        var received = new StringBuilder();
        var buffer = new byte[8192];
        while (!received.ToString().Contains("\r\n\r\n", StringComparison.Ordinal))
        {
            int read;
            try
            {
                read = await stream.ReadAsync(buffer);
            }
            catch (IOException)
            {
                break;
            }
            if (read == 0)
            {
                break;
            }
            received.Append(Encoding.Latin1.GetString(buffer, 0, read));
        }
        return received.ToString();
    }
}
