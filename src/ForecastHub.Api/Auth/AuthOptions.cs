namespace ForecastHub.Api.Auth;

/// <summary>Configuration section <c>Auth</c>.</summary>
public sealed class AuthOptions
{
    public const string SectionName = "Auth";

    /// <summary>Shortest admin key accepted from configuration; shorter ones stop the start.</summary>
    public const int MinAdminKeyLength = 32;

    /// <summary>An admin key (<c>Authorization: Bearer &lt;key&gt;</c>) kept in configuration. Empty:
    /// the first start generates an admin key, stores its digest and prints it once.</summary>
    public string AdminKey { get; set; } = "";

    /// <summary>When true, reads need no key.</summary>
    public bool AllowAnonymousRead { get; set; }

    /// <summary>How long a verified key is remembered in memory; 0 looks every request up. Revoking
    /// through the API takes effect at once either way.</summary>
    public int KeyCacheSeconds { get; set; } = 30;
}
