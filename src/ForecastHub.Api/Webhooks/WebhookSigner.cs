using System.Security.Cryptography;
using System.Text;

namespace ForecastHub.Api.Webhooks;

/// <summary>Standard Webhooks signing: <c>v1,</c> + base64 of HMAC-SHA256 over "id.timestamp.body"
/// with the secret's key bytes; the timestamp is whole Unix seconds.</summary>
public static class WebhookSigner
{
    public static string Sign(string messageId, long unixSeconds, string body, string secret)
    {
        ArgumentNullException.ThrowIfNull(messageId);
        ArgumentNullException.ThrowIfNull(body);
        var signed = Encoding.UTF8.GetBytes(FormattableString.Invariant($"{messageId}.{unixSeconds}.{body}"));
        return "v1," + Convert.ToBase64String(HMACSHA256.HashData(WebhookSecrets.KeyBytes(secret), signed));
    }
}
