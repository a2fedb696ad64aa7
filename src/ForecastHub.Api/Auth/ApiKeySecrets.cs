using System.Security.Cryptography;
using System.Text;

namespace ForecastHub.Api.Auth;

/// <summary>
/// Making and checking key secrets. A secret is "fhk_" plus 256 random bits in base64url; the
/// prefix lets secret scanners recognise a leaked key. Only SHA-256 digests are stored: a slow
/// password hash protects guessable passwords, but a 256-bit random secret cannot be guessed from
/// its digest, and a fast unsalted digest lets each request find its key by one index lookup.
/// </summary>
public static class ApiKeySecrets
{
    public const string Prefix = "fhk_";

    /// <summary>Longer presented keys are refused before hashing.</summary>
    public const int MaxPresentedLength = 512;

    public static string NewSecret() => Prefix + Base64Url(RandomNumberGenerator.GetBytes(32));

    /// <summary>A public key id, safe to log and show: "key-" plus 64 random bits in hex.</summary>
    public static string NewId() => "key-" + Convert.ToHexStringLower(RandomNumberGenerator.GetBytes(8));

    public static byte[] Digest(string secret) => SHA256.HashData(Encoding.UTF8.GetBytes(secret));

    /// <summary>Compares two secrets in time that depends on neither content nor length.</summary>
    public static bool SecretsEqual(string presented, string expected) =>
        CryptographicOperations.FixedTimeEquals(Digest(presented), Digest(expected));

    private static string Base64Url(byte[] bytes) =>
        Convert.ToBase64String(bytes).TrimEnd('=').Replace('+', '-').Replace('/', '_');
}
