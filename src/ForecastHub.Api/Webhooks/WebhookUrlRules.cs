using System.Net;
using System.Net.Sockets;

namespace ForecastHub.Api.Webhooks;

/// <summary>
/// Which addresses a webhook may point at: absolute http or https URLs without user name or
/// password (they would be stored and logged with the URL) and without a fragment. Unless
/// <c>Webhooks:AllowPrivateNetworks</c> is on, the host must not be loopback, private,
/// link-local, carrier-grade NAT, unspecified or multicast; this is checked on the URL when it is
/// registered and again on every resolved address when a delivery connects, so a name that later
/// resolves to an inside address is refused too.
/// </summary>
public static class WebhookUrlRules
{
    public const int MaxUrlLength = 2048;

    /// <summary>Null when the URL may be registered, else the reason it may not.</summary>
    public static string? Check(string? url, bool allowPrivateNetworks)
    {
        if (string.IsNullOrWhiteSpace(url))
        {
            return "url is required: the http or https address that receives the events.";
        }
        if (url.Length > MaxUrlLength)
        {
            return $"url may be at most {MaxUrlLength} characters.";
        }
        if (!Uri.TryCreate(url, UriKind.Absolute, out var uri) || (uri.Scheme != Uri.UriSchemeHttp && uri.Scheme != Uri.UriSchemeHttps))
        {
            return "url must be an absolute http:// or https:// address.";
        }
        if (uri.UserInfo.Length > 0)
        {
            return "url must not carry a user name or password; the receiver checks the webhook-signature header instead.";
        }
        if (uri.Fragment.Length > 0)
        {
            return "url must not have a #fragment: it is never sent to the receiver.";
        }
        if (!allowPrivateNetworks && IsPrivateHost(uri))
        {
            return "url points at a loopback or private network address; these are refused unless the service runs with Webhooks:AllowPrivateNetworks=true.";
        }
        return null;
    }

    private static bool IsPrivateHost(Uri uri)
    {
        if (uri.IsLoopback || uri.Host.EndsWith(".localhost", StringComparison.OrdinalIgnoreCase))
        {
            return true;
        }
        return IPAddress.TryParse(uri.DnsSafeHost, out var address) && IsPrivate(address);
    }

    /// <summary>Whether an address is anything but a public unicast address.</summary>
    public static bool IsPrivate(IPAddress address)
    {
        ArgumentNullException.ThrowIfNull(address);
        if (address.IsIPv4MappedToIPv6)
        {
            address = address.MapToIPv4();
        }
        if (IPAddress.IsLoopback(address) || address.Equals(IPAddress.Any) || address.Equals(IPAddress.IPv6Any))
        {
            return true;
        }
        if (address.AddressFamily == AddressFamily.InterNetwork)
        {
            var b = address.GetAddressBytes();
            return b[0] == 0 || b[0] == 10 || b[0] >= 224
                || (b[0] == 100 && b[1] >= 64 && b[1] <= 127)
                || (b[0] == 169 && b[1] == 254)
                || (b[0] == 172 && b[1] >= 16 && b[1] <= 31)
                || (b[0] == 192 && b[1] == 168);
        }
        var v6 = address.GetAddressBytes();
        return address.IsIPv6LinkLocal || address.IsIPv6SiteLocal || address.IsIPv6Multicast || (v6[0] & 0xFE) == 0xFC;
    }
}
