using System.Globalization;
using System.Text.RegularExpressions;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Hosting;
using ForecastHub.Api.OpenApi;
using ForecastHub.Api.Problems;
using ForecastHub.Api.Sites;
using ForecastHub.Storage.Webhooks;
using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.AspNetCore.Mvc;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Webhooks;

public static partial class WebhookEndpoints
{
    public const int MaxBodyBytes = 8 * 1024;
    public const int MaxSiteIds = 100;
    public const int MaxWebhooks = 100;
    public const int DefaultPageSize = 100;
    public const int MaxPageSize = 1000;

    /// <summary>Webhook subscriptions and their delivery logs; every call needs an admin key.</summary>
    public static RouteGroupBuilder MapWebhooks(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/webhooks").WithTags("Webhooks").RequireAuthorization(AuthPolicies.Admin);
        group.MapPost("/", Create).WithName("CreateWebhook")
            .WithSummary("Subscribe an address to risk and health events; the answer is the only time its signing secret is shown.")
            .Accepts<WebhookBody>("application/json")
            .WithRequestBodyLimit(MaxBodyBytes)
            .ProducesProblem(StatusCodes.Status409Conflict);
        group.MapGet("/", List).WithName("ListWebhooks").WithSummary("List webhooks by id, one page at a time, without their secrets.")
            .ProducesProblem(StatusCodes.Status400BadRequest);
        group.MapGet("/{webhookId}", Get).WithName("GetWebhook").WithSummary("Read one webhook without its secret.");
        group.MapDelete("/{webhookId}", Delete).WithName("DeleteWebhook")
            .WithSummary("Delete a webhook with its delivery log; nothing pending for it is sent any more.");
        group.MapGet("/{webhookId}/deliveries", ListDeliveries).WithName("ListWebhookDeliveries")
            .WithSummary("A webhook's deliveries, newest first: event, status, attempts and the last error.")
            .ProducesProblem(StatusCodes.Status400BadRequest);
        return group;
    }

    /// <response code="409">There are already 100 webhooks (delete one first), or the new webhook's random id met one created at the same moment
    /// (send the request again). Nothing was stored.</response>
    public static async Task<Results<Created<CreatedWebhookResponse>, ValidationProblem, ProblemHttpResult>> Create(
        HttpRequest request, HttpResponse response, IWebhookStore webhooks, IOptions<WebhookOptions> options, TimeProvider clock,
        CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(response);
        ArgumentNullException.ThrowIfNull(options);
        var (body, problem) = await RequestBody.ReadObjectAsync<WebhookBody>(request, MaxBodyBytes, "webhook request",
            "{\"url\": \"https://example.org/hooks/forecasthub\"}", cancellationToken).ConfigureAwait(false);
        if (problem is not null)
        {
            return problem;
        }
        var errors = Validate(body!, options.Value.AllowPrivateNetworks);
        if (errors.Count > 0)
        {
            return ApiProblems.Invalid(errors);
        }
        if ((await webhooks.ListAsync(null, MaxWebhooks, cancellationToken).ConfigureAwait(false)).Count >= MaxWebhooks)
        {
            return ApiProblems.Conflict($"There are already {MaxWebhooks} webhooks; delete one before adding another.");
        }
        var record = new WebhookRecord(
            WebhookSecrets.NewId(),
            body!.Url!,
            WebhookSecrets.NewSecret(),
            (body.SiteIds ?? []).Distinct(StringComparer.Ordinal).Order(StringComparer.Ordinal).ToList(),
            body.Events is { Count: > 0 } events ? WebhookEvents.Families.Where(events.Contains).ToList() : WebhookEvents.Families,
            clock.GetUtcNow());
        if (!await webhooks.CreateAsync(record, cancellationToken).ConfigureAwait(false))
        {
            return ApiProblems.Conflict("A webhook with the same id was created at the same moment; send the request again.");
        }
        // The secret must not linger in any cache between the service and the caller.
        response.Headers.CacheControl = "no-store";
        return TypedResults.Created($"/api/v1/webhooks/{record.Id}",
            new CreatedWebhookResponse(record.Id, record.Url, record.SiteIds, record.Events, record.Secret, record.CreatedAt));
    }

    /// <param name="after">Where the page starts: the cursor from the previous page's <c>next</c> link; absent for the first page.</param>
    /// <param name="limit">Most items on this page.</param>
    public static async Task<Results<Ok<WebhookList>, ProblemHttpResult>> List(
        IWebhookStore webhooks, [FromQuery] string? after, [FromQuery, QueryValue(QueryValueKind.WholeNumber, Minimum = 1, Maximum = MaxPageSize, Default = DefaultPageSize)] string? limit, CancellationToken cancellationToken)
    {
        if (PageSize(limit) is not { } pageSize)
        {
            return BadLimit();
        }
        var page = await webhooks.ListAsync(after, pageSize + 1, cancellationToken).ConfigureAwait(false);
        var shown = page.Take(pageSize).Select(WebhookResponse.From).ToList();
        var next = page.Count > pageSize ? $"/api/v1/webhooks?after={Uri.EscapeDataString(shown[^1].Id)}&limit={pageSize}" : null;
        return TypedResults.Ok(new WebhookList(shown, next));
    }

    public static async Task<Results<Ok<WebhookResponse>, ProblemHttpResult>> Get(string webhookId, IWebhookStore webhooks, CancellationToken cancellationToken)
    {
        var webhook = await webhooks.GetAsync(webhookId, cancellationToken).ConfigureAwait(false);
        return webhook is null ? NoSuchWebhook(webhookId) : TypedResults.Ok(WebhookResponse.From(webhook));
    }

    public static async Task<Results<NoContent, ProblemHttpResult>> Delete(string webhookId, IWebhookStore webhooks, CancellationToken cancellationToken) =>
        await webhooks.DeleteAsync(webhookId, cancellationToken).ConfigureAwait(false) ? TypedResults.NoContent() : NoSuchWebhook(webhookId);

    /// <param name="before">Where the page starts (deliveries come newest first): the cursor from the previous page's <c>next</c> link.</param>
    /// <param name="limit">Most items on this page.</param>
    public static async Task<Results<Ok<DeliveryList>, ProblemHttpResult>> ListDeliveries(
        string webhookId, IWebhookStore webhooks, [FromQuery] string? before, [FromQuery, QueryValue(QueryValueKind.WholeNumber, Minimum = 1, Maximum = MaxPageSize, Default = DefaultPageSize)] string? limit, CancellationToken cancellationToken)
    {
        if (PageSize(limit) is not { } pageSize)
        {
            return BadLimit();
        }
        long? beforeSeq = null;
        if (before is not null)
        {
            if (!long.TryParse(before, NumberStyles.None, CultureInfo.InvariantCulture, out var seq))
            {
                return ApiProblems.BadRequest("before", "before must be the cursor from a previous page's 'next' link.");
            }
            beforeSeq = seq;
        }
        if (await webhooks.GetAsync(webhookId, cancellationToken).ConfigureAwait(false) is null)
        {
            return NoSuchWebhook(webhookId);
        }
        var page = await webhooks.ListDeliveriesAsync(webhookId, beforeSeq, pageSize + 1, cancellationToken).ConfigureAwait(false);
        var shown = page.Take(pageSize).ToList();
        var next = page.Count > pageSize
            ? FormattableString.Invariant($"/api/v1/webhooks/{webhookId}/deliveries?before={shown[^1].Seq}&limit={pageSize}")
            : null;
        return TypedResults.Ok(new DeliveryList(shown.Select(DeliveryResponse.From).ToList(), next));
    }

    private static int? PageSize(string? limit) =>
        limit is null ? DefaultPageSize
        : int.TryParse(limit, NumberStyles.None, CultureInfo.InvariantCulture, out var size) && size is >= 1 and <= MaxPageSize ? size
        : null;

    private static ProblemHttpResult BadLimit() => ApiProblems.BadRequest("limit", $"limit must be a whole number from 1 to {MaxPageSize}.");

    private static ProblemHttpResult NoSuchWebhook(string webhookId) =>
        ApiProblems.NotFound(WebhookIdPattern().IsMatch(webhookId)
            ? $"There is no webhook '{webhookId}'."
            : "There is no such webhook: webhook ids look like 'wh-' followed by 16 hexadecimal digits.");

    [GeneratedRegex("^wh-[0-9a-f]{16}$")]
    private static partial Regex WebhookIdPattern();

    private static Dictionary<string, string[]> Validate(WebhookBody body, bool allowPrivateNetworks)
    {
        var errors = new Dictionary<string, string[]>();
        if (WebhookUrlRules.Check(body.Url, allowPrivateNetworks) is { } urlProblem)
        {
            errors["url"] = [urlProblem];
        }
        var siteIds = body.SiteIds ?? [];
        if (siteIds.Count > MaxSiteIds)
        {
            errors["siteIds"] = [$"A webhook may list at most {MaxSiteIds} sites; leave siteIds out for all sites."];
        }
        else if (siteIds.Where(s => s is null || !SiteRules.IsValidSiteId(s)).Select(s => s ?? "null").FirstOrDefault() is { } bad)
        {
            errors["siteIds"] = [$"'{bad}' is not a site id: site ids are slugs of lower-case letters, digits and '-', at most 63 characters."];
        }
        if (body.Events is { } events && (events.Count == 0 || events.Any(e => e is null || !WebhookEvents.Families.Contains(e, StringComparer.Ordinal))))
        {
            errors["events"] = [$"events lists one or both of {string.Join(", ", WebhookEvents.Families)}; leave it out for both."];
        }
        return errors;
    }
}
