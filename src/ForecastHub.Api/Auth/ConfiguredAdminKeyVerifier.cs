using System.Security.Cryptography;
using System.Text;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Auth;

/// <summary>Accepts exactly the key in <c>Auth:AdminKey</c>, compared in constant time over SHA-256
/// digests so neither content nor length leaks through timing.</summary>
public sealed class ConfiguredAdminKeyVerifier(IOptionsMonitor<AuthOptions> options) : IApiKeyVerifier
{
    public const string AdminKeyId = "configured-admin";

    public ValueTask<ApiKeyIdentity?> VerifyAsync(string presentedKey, CancellationToken cancellationToken)
    {
        var configured = options.CurrentValue.AdminKey;
        if (string.IsNullOrEmpty(configured) || string.IsNullOrEmpty(presentedKey))
        {
            return ValueTask.FromResult<ApiKeyIdentity?>(null);
        }
        var match = CryptographicOperations.FixedTimeEquals(
            SHA256.HashData(Encoding.UTF8.GetBytes(presentedKey)),
            SHA256.HashData(Encoding.UTF8.GetBytes(configured)));
        return ValueTask.FromResult(match ? new ApiKeyIdentity(AdminKeyId, ApiKeyScopes.Admin, []) : null);
    }
}
