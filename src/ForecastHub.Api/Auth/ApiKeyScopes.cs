namespace ForecastHub.Api.Auth;

/// <summary>Key scopes of DESIGN section 7 and the claim types that carry them.</summary>
public static class ApiKeyScopes
{
    public const string Admin = "admin";
    public const string Ingest = "ingest";
    public const string Read = "read";

    public const string ScopeClaim = "forecasthub:scope";
    public const string KeyIdClaim = "forecasthub:key-id";
    public const string SiteClaim = "forecasthub:site";
}
