using System.Net;
using System.Net.Sockets;
using System.Text;
using ForecastHub.Storage.Webhooks;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Webhooks;

/// <summary>The outcome of one POST: delivered (a 2xx answer), or why not.</summary>
public sealed record SendResult(bool Delivered, int? StatusCode, string? Error);

/// <summary>
/// Posts one signed delivery. Redirects are not followed and no proxy is used; unless private
/// networks are allowed, every address a host name resolves to is checked when connecting, and
/// only public ones are tried.
/// </summary>
public sealed class WebhookSender : IDisposable
{
    private readonly HttpClient client;
    private readonly TimeProvider clock;

    public WebhookSender(IOptions<WebhookOptions> options, TimeProvider clock)
    {
        ArgumentNullException.ThrowIfNull(options);
        this.clock = clock;
        var allowPrivate = options.Value.AllowPrivateNetworks;
        var handler = new SocketsHttpHandler
        {
            AllowAutoRedirect = false,
            UseCookies = false,
            UseProxy = false,
            PooledConnectionLifetime = TimeSpan.FromMinutes(5),
            ConnectCallback = (context, cancellationToken) => ConnectAsync(context.DnsEndPoint, allowPrivate, cancellationToken),
        };
        client = new HttpClient(handler) { Timeout = TimeSpan.FromSeconds(options.Value.TimeoutSeconds) };
        client.DefaultRequestHeaders.UserAgent.ParseAdd("ForecastHub-Webhooks/1");
    }

    public async Task<SendResult> SendAsync(DueDelivery due, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(due);
        var timestamp = clock.GetUtcNow().ToUnixTimeSeconds();
        using var request = new HttpRequestMessage(HttpMethod.Post, due.Url)
        {
            Content = new StringContent(due.Delivery.Body, Encoding.UTF8, "application/json"),
        };
        request.Headers.Add("webhook-id", due.Delivery.MessageId);
        request.Headers.Add("webhook-timestamp", timestamp.ToString(System.Globalization.CultureInfo.InvariantCulture));
        request.Headers.Add("webhook-signature", WebhookSigner.Sign(due.Delivery.MessageId, timestamp, due.Delivery.Body, due.Secret));
        try
        {
            using var response = await client.SendAsync(request, HttpCompletionOption.ResponseHeadersRead, cancellationToken).ConfigureAwait(false);
            var code = (int)response.StatusCode;
            return response.IsSuccessStatusCode
                ? new SendResult(true, code, null)
                : new SendResult(false, code, $"The receiver answered HTTP {code} {response.ReasonPhrase}.");
        }
        catch (TaskCanceledException) when (!cancellationToken.IsCancellationRequested)
        {
            return new SendResult(false, null, $"No answer within {client.Timeout.TotalSeconds:0} s.");
        }
        catch (HttpRequestException error)
        {
            return new SendResult(false, null, $"Could not reach the receiver: {error.Message}");
        }
    }

    private static async ValueTask<Stream> ConnectAsync(DnsEndPoint endPoint, bool allowPrivate, CancellationToken cancellationToken)
    {
        var addresses = await Dns.GetHostAddressesAsync(endPoint.Host, cancellationToken).ConfigureAwait(false);
        if (!allowPrivate)
        {
            addresses = addresses.Where(a => !WebhookUrlRules.IsPrivate(a)).ToArray();
            if (addresses.Length == 0)
            {
                throw new HttpRequestException($"'{endPoint.Host}' resolves only to loopback or private addresses, which Webhooks:AllowPrivateNetworks does not allow.");
            }
        }
        var socket = new Socket(SocketType.Stream, ProtocolType.Tcp) { NoDelay = true };
        try
        {
            await socket.ConnectAsync(addresses, endPoint.Port, cancellationToken).ConfigureAwait(false);
            return new NetworkStream(socket, ownsSocket: true);
        }
        catch
        {
            socket.Dispose();
            throw;
        }
    }

    public void Dispose() => client.Dispose();
}
