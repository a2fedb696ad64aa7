using System.Security.Cryptography;
using System.Text;
using System.Threading.Channels;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Hosting.Server;
using Microsoft.AspNetCore.Hosting.Server.Features;
using Microsoft.AspNetCore.Http;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Logging;

namespace ForecastHub.Api.Tests.Webhooks;

/// <summary>A delivery as the receiver saw it: the three Standard Webhooks headers and the raw body.</summary>
public sealed record ReceivedDelivery(string Id, string Timestamp, string Signature, string Body, int AnsweredWith)
{
    /// <summary>Checks the signature by its own HMAC-SHA256 over "id.timestamp.body" with the key
    /// bytes of the "whsec_" secret, independent of the service's signer.</summary>
    public bool SignatureValidFor(string secret)
    {
        var key = Convert.FromBase64String(secret["whsec_".Length..]);
        using var hmac = new HMACSHA256(key);
        var expected = "v1," + Convert.ToBase64String(hmac.ComputeHash(Encoding.UTF8.GetBytes($"{Id}.{Timestamp}.{Body}")));
        return Signature.Split(' ').Any(s => CryptographicOperations.FixedTimeEquals(Encoding.ASCII.GetBytes(s), Encoding.ASCII.GetBytes(expected)));
    }
}

/// <summary>A real HTTP receiver on 127.0.0.1 (Kestrel on a free port) that records what it is sent
/// and answers with the status the test chooses.</summary>
public sealed class WebhookReceiver : IAsyncDisposable
{
    private readonly WebApplication app;
    private readonly Channel<ReceivedDelivery> received = Channel.CreateUnbounded<ReceivedDelivery>();

    private WebhookReceiver(WebApplication app) => this.app = app;

    /// <summary>The status code the next request is answered with.</summary>
    public int AnswerWith { get; set; } = StatusCodes.Status204NoContent;

    public string Url { get; private set; } = "";

    public static async Task<WebhookReceiver> StartAsync(int port = 0)
    {
        var builder = WebApplication.CreateSlimBuilder();
        builder.Logging.ClearProviders();
        builder.WebHost.UseKestrel().UseUrls($"http://127.0.0.1:{port}");
        var app = builder.Build();
        var receiver = new WebhookReceiver(app);
        app.MapPost("/hook", async (HttpContext context) =>
        {
            using var reader = new StreamReader(context.Request.Body, Encoding.UTF8);
            var body = await reader.ReadToEndAsync();
            var status = receiver.AnswerWith;
            receiver.received.Writer.TryWrite(new ReceivedDelivery(
                context.Request.Headers["webhook-id"].ToString(),
                context.Request.Headers["webhook-timestamp"].ToString(),
                context.Request.Headers["webhook-signature"].ToString(),
                body,
                status));
            return Results.StatusCode(status);
        });
        await app.StartAsync();
        var address = app.Services.GetRequiredService<IServer>().Features.Get<IServerAddressesFeature>()!.Addresses.First();
        receiver.Url = address.TrimEnd('/') + "/hook";
        return receiver;
    }

    public int Port => new Uri(Url).Port;

    /// <summary>The next delivery received, waiting for it at most <paramref name="patience"/>.</summary>
    public async Task<ReceivedDelivery> NextAsync(TimeSpan patience)
    {
        using var timeout = new CancellationTokenSource(patience);
        return await received.Reader.ReadAsync(timeout.Token);
    }

    /// <summary>Whether a delivery is waiting to be read now.</summary>
    public bool HasMore => received.Reader.TryPeek(out _);

    public async ValueTask DisposeAsync()
    {
        await app.StopAsync();
        await app.DisposeAsync();
    }
}
