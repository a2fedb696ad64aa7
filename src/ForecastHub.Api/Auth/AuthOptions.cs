namespace ForecastHub.Api.Auth;

/// <summary>Configuration section <c>Auth</c>.</summary>
public sealed class AuthOptions
{
    public const string SectionName = "Auth";

    /// <summary>The admin key (<c>Authorization: Bearer &lt;key&gt;</c>); empty refuses every write.</summary>
    public string AdminKey { get; set; } = "";

    /// <summary>When true, reads need no key.</summary>
    public bool AllowAnonymousRead { get; set; }
}
