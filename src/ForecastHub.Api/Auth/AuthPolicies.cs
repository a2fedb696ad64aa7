namespace ForecastHub.Api.Auth;

/// <summary>Authorization policies the endpoint groups use.</summary>
public static class AuthPolicies
{
    /// <summary>Reading data: a read or admin key, or no key when <c>Auth:AllowAnonymousRead</c> is on.</summary>
    public const string Read = "read";

    /// <summary>Writing a site's observations: an admin key, or an ingest key for all sites or for
    /// the route's <c>siteId</c>.</summary>
    public const string Ingest = "ingest";

    /// <summary>Creating, changing and deleting sites, managing keys and other admin calls.</summary>
    public const string Admin = "admin";
}
