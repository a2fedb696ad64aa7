using ForecastHub.Api.Http;
using System.Text.Json;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Health;
using ForecastHub.Api.Hosting;
using ForecastHub.Api.OpenApi;
using ForecastHub.Api.Problems;
using ForecastHub.Storage.Sites;
using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.AspNetCore.Mvc;

namespace ForecastHub.Api.Sites;

public static class SitesEndpoints
{
    public const int MaxBodyBytes = 64 * 1024;
    public const int DefaultPageSize = 100;
    public const int MaxPageSize = 1000;

    private static readonly JsonSerializerOptions BodyOptions = new(JsonSerializerDefaults.Web)
    {
        UnmappedMemberHandling = System.Text.Json.Serialization.JsonUnmappedMemberHandling.Disallow,
        AllowDuplicateProperties = false,
        NumberHandling = System.Text.Json.Serialization.JsonNumberHandling.Strict,
    };

    public static RouteGroupBuilder MapSites(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/sites").WithTags("Sites").RequireAuthorization(AuthPolicies.Read);
        group.MapPost("/", Create).WithName("CreateSite").WithSummary("Create a site.")
            .Accepts<SiteBody>("application/json").WithRequestBodyLimit(MaxBodyBytes).ProducesProblem(StatusCodes.Status409Conflict)
            .RequireAuthorization(AuthPolicies.Admin);
        group.MapGet("/", List).WithName("ListSites").WithSummary("List sites by id, one page at a time, each with its model-health state.")
            .ProducesProblem(StatusCodes.Status400BadRequest).WithNextLinkHeader();
        group.MapGet("/{siteId}", Get).WithName("GetSite").WithSummary("Read a site and its settings.");
        group.MapPatch("/{siteId}", Update).WithName("UpdateSite")
            .WithSummary("Change a site's settings; a change of anything but the name raises settingsVersion.")
            .Accepts<SiteBody>("application/json").WithRequestBodyLimit(MaxBodyBytes)
            .RequireAuthorization(AuthPolicies.Admin);
        group.MapDelete("/{siteId}", Delete).WithName("DeleteSite").WithSummary("Delete a site with all its data.")
            .RequireAuthorization(AuthPolicies.Admin);
        return group;
    }

    /// <response code="409">A site with this id already exists (deleted sites free their id); change it with PATCH.</response>
    public static async Task<Results<Created<SiteResponse>, ValidationProblem, ProblemHttpResult>> Create(
        HttpRequest request, ISiteStore sites, TimeProvider clock, CancellationToken cancellationToken)
    {
        var (body, raw, problem) = await ReadBody(request, cancellationToken).ConfigureAwait(false);
        if (problem is not null)
        {
            return problem;
        }
        var errors = new Dictionary<string, string[]>();
        var site = SiteRules.Build(body!, raw, current: null, clock.GetUtcNow(), errors);
        if (site is null)
        {
            return ApiProblems.Invalid(errors);
        }
        if (!await sites.CreateAsync(site, cancellationToken).ConfigureAwait(false))
        {
            return ApiProblems.Conflict($"A site with id '{site.Id}' already exists; change it with PATCH /api/v1/sites/{site.Id}.");
        }
        return TypedResults.Created($"/api/v1/sites/{site.Id}", SiteResponse.From(site));
    }

    /// <param name="after">Where the page starts: the cursor from the previous page's <c>next</c> link; absent for the first page.</param>
    /// <param name="limit">Most items on this page.</param>
    public static async Task<Results<Ok<SiteList>, ProblemHttpResult>> List(
        ISiteStore sites, ModelHealthService health, [FromQuery] string? after, [FromQuery, QueryValue(QueryValueKind.WholeNumber, Minimum = 1, Maximum = MaxPageSize, Default = DefaultPageSize)] string? limit, CancellationToken cancellationToken)
    {
        var pageSize = DefaultPageSize;
        if (limit is not null && (!int.TryParse(limit, out pageSize) || pageSize < 1 || pageSize > MaxPageSize))
        {
            return ApiProblems.BadRequest("limit", $"limit must be a whole number from 1 to {MaxPageSize}.");
        }
        var page = await sites.ListAsync(after, pageSize + 1, cancellationToken).ConfigureAwait(false);
        var shown = new List<ListedSiteResponse>(Math.Min(page.Count, pageSize));
        foreach (var site in page.Take(pageSize))
        {
            // The same rules as GET .../health; a few indexed reads per site, no history is read.
            var assessment = await health.EvaluateAsync(site, cancellationToken).ConfigureAwait(false);
            shown.Add(new ListedSiteResponse(SiteResponse.From(site), assessment.State));
        }

        var next = page.Count > pageSize
            ? $"/api/v1/sites?after={Uri.EscapeDataString(shown[^1].Id)}&limit={pageSize}"
            : null;
        return TypedResults.Ok(new SiteList(shown, next));
    }

    public static async Task<Results<Ok<SiteResponse>, ProblemHttpResult>> Get(
        string siteId, ISiteStore sites, CancellationToken cancellationToken)
    {
        var site = SiteRules.IsValidSiteId(siteId) ? await sites.GetAsync(siteId, cancellationToken).ConfigureAwait(false) : null;
        return site is null ? NoSuchSite(siteId) : TypedResults.Ok(SiteResponse.From(site));
    }

    public static async Task<Results<Ok<SiteResponse>, ValidationProblem, ProblemHttpResult>> Update(
        string siteId, HttpRequest request, ISiteStore sites, TimeProvider clock, CancellationToken cancellationToken)
    {
        if (!SiteRules.IsValidSiteId(siteId))
        {
            return NoSuchSite(siteId);
        }
        var (body, raw, problem) = await ReadBody(request, cancellationToken).ConfigureAwait(false);
        if (problem is not null)
        {
            return problem;
        }
        var errors = new Dictionary<string, string[]>();
        var updated = await sites.UpdateAsync(siteId,
            current => SiteRules.Build(body!, raw, current, clock.GetUtcNow(), errors), cancellationToken).ConfigureAwait(false);
        if (updated is null)
        {
            return NoSuchSite(siteId);
        }
        return errors.Count > 0 ? ApiProblems.Invalid(errors) : TypedResults.Ok(SiteResponse.From(updated));
    }

    public static async Task<Results<NoContent, ProblemHttpResult>> Delete(
        string siteId, ISiteStore sites, CancellationToken cancellationToken)
    {
        var deleted = SiteRules.IsValidSiteId(siteId) && await sites.DeleteAsync(siteId, cancellationToken).ConfigureAwait(false);
        return deleted ? TypedResults.NoContent() : NoSuchSite(siteId);
    }

    public static ProblemHttpResult NoSuchSite(string siteId) =>
        ApiProblems.NotFound(SiteRules.IsValidSiteId(siteId)
            ? $"There is no site '{siteId}'."
            : "There is no such site: site ids are slugs of lower-case letters, digits and '-', at most 63 characters.");

    // The body as a typed record plus the raw object (PATCH needs to know which fields were sent).
    private static async Task<(SiteBody? Body, JsonElement Raw, ProblemHttpResult? Problem)> ReadBody(
        HttpRequest request, CancellationToken cancellationToken)
    {
        if (!RequestBody.IsJson(request))
        {
            return (null, default, ApiProblems.UnsupportedMediaType("Send the site as JSON with 'Content-Type: application/json'."));
        }
        var bytes = await RequestBody.ReadAsync(request, MaxBodyBytes, cancellationToken).ConfigureAwait(false);
        if (bytes is null)
        {
            return (null, default, ApiProblems.TooLarge($"A site body may be at most {MaxBodyBytes / 1024} KiB."));
        }
        using var document = RequestBody.ParseJson(bytes, out var error);
        if (document is null)
        {
            return (null, default, ApiProblems.BadRequest("body", error!));
        }
        if (document.RootElement.ValueKind != JsonValueKind.Object)
        {
            return (null, default, ApiProblems.BadRequest("body", "The body must be a JSON object describing the site."));
        }
        try
        {
            var body = document.RootElement.Deserialize<SiteBody>(BodyOptions)!;
            return (body, document.RootElement.Clone(), null);
        }
        catch (JsonException e)
        {
            var field = (e.Path ?? "$").TrimStart('$').TrimStart('.');
            return (null, default, ApiProblems.BadRequest(field,
                $"'{field}' is not allowed here or has the wrong type: {e.Message.Split(" Path:")[0]}"));
        }
    }
}
