namespace ForecastHub.Api.Auth;

/// <summary>Authorization policies the endpoint groups use.</summary>
public static class AuthPolicies
{
    /// <summary>Reading data: any valid key, or no key when <c>Auth:AllowAnonymousRead</c> is on.</summary>
    public const string Read = "read";

    /// <summary>Posting observations: an admin key (ingest keys come with scoped keys).</summary>
    public const string Ingest = "ingest";

    /// <summary>Creating, changing and deleting sites and other admin calls.</summary>
    public const string Admin = "admin";
}
