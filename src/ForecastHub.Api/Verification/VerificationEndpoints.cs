using ForecastHub.Api.Http;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Problems;
using ForecastHub.Storage.Sites;
using Microsoft.AspNetCore.Http.HttpResults;

namespace ForecastHub.Api.Verification;

public static class VerificationEndpoints
{
    public static RouteGroupBuilder MapVerification(this RouteGroupBuilder api)
    {
        ArgumentNullException.ThrowIfNull(api);
        var group = api.MapGroup("/sites/{siteId}").WithTags("Verification").RequireAuthorization(AuthPolicies.Read);
        group.MapGet("/verification", GetVerification).WithName("GetVerification").WithSiteETag()
            .WithSummary("A rolling-origin backtest of the site's own history and the live scores of its archived day-ahead forecasts.")
            .ProducesProblem(StatusCodes.Status409Conflict);
        return group;
    }

    /// <response code="409">Nothing to verify yet: the site has no fitted model (it is warming up, its fit failed, or its stored model is being refitted).</response>
    public static async Task<Results<Ok<VerificationResponse>, ProblemHttpResult>> GetVerification(
        string siteId, ISiteStore sites, VerificationService verification, CancellationToken cancellationToken)
    {
        var site = await sites.GetAsync(siteId, cancellationToken);
        if (site is null)
        {
            return ApiProblems.NotFound($"There is no site '{siteId}'.");
        }

        var result = await verification.GetAsync(site, cancellationToken);
        return result is null
            ? ApiProblems.Conflict($"Site '{siteId}' has no fitted model yet, so there is nothing to verify.")
            : TypedResults.Ok(result);
    }
}
