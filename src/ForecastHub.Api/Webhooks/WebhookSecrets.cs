using System.Security.Cryptography;

namespace ForecastHub.Api.Webhooks;

/// <summary>
/// Webhook ids and signing secrets. A secret follows the Standard Webhooks convention: "whsec_"
/// plus the base64 of the key bytes (here 32 random bytes); the HMAC key is the decoded bytes.
/// </summary>
public static class WebhookSecrets
{
    public const string Prefix = "whsec_";

    public static string NewSecret() => Prefix + Convert.ToBase64String(RandomNumberGenerator.GetBytes(32));

    /// <summary>A public webhook id, safe to log and show: "wh-" plus 64 random bits in hex.</summary>
    public static string NewId() => "wh-" + Convert.ToHexStringLower(RandomNumberGenerator.GetBytes(8));

    /// <summary>The HMAC key of a "whsec_" secret.</summary>
    public static byte[] KeyBytes(string secret)
    {
        ArgumentNullException.ThrowIfNull(secret);
        if (!secret.StartsWith(Prefix, StringComparison.Ordinal))
        {
            throw new ArgumentException("A webhook secret starts with 'whsec_'.", nameof(secret));
        }

        return Convert.FromBase64String(secret[Prefix.Length..]);
    }
}
