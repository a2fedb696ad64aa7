using System.Globalization;
using System.Security.Cryptography;
using System.Text;
using ForecastHub.Api.Models;
using ForecastHub.Storage.Sites;
using Microsoft.Net.Http.Headers;

namespace ForecastHub.Api.Http;

/// <summary>
/// Conditional GET for answers computed from one site: the ETag is the forecast cache's version key
/// (this process's start, the site's settings, its data and model versions, the current grid step)
/// with the request's path, query and representation, so a matching <c>If-None-Match</c> is answered
/// 304 before anything is computed. Answers are <c>Cache-Control: private, no-cache</c>: kept by the
/// caller's browser or client only, and revalidated on every use.
/// </summary>
public static class SiteETag
{
    public const string CacheControl = "private, no-cache";

    // Versions restart at zero with the process; the start time keeps old tags from matching new answers.
    private static readonly string ProcessEpoch = Environment.ProcessId.ToString(CultureInfo.InvariantCulture) + "-" +
        DateTime.UtcNow.Ticks.ToString(CultureInfo.InvariantCulture);

    public static TBuilder WithSiteETag<TBuilder>(this TBuilder builder)
        where TBuilder : IEndpointConventionBuilder =>
        builder.WithMetadata(new ConditionalGet()).AddEndpointFilter(async (context, next) =>
        {
            var http = context.HttpContext;
            var siteId = http.GetRouteValue("siteId") as string;
            var site = siteId is null ? null : await http.RequestServices.GetRequiredService<ISiteStore>().GetAsync(siteId, http.RequestAborted);
            if (site is null)
            {
                return await next(context);
            }

            var tag = For(site, http);
            if (Matches(http.Request, tag))
            {
                SetHeaders(http.Response, tag);
                return TypedResults.StatusCode(StatusCodes.Status304NotModified);
            }

            var result = await next(context);
            var answer = result is INestedHttpResult nested ? nested.Result : result;
            // A content result without a status code is a 200.
            if (answer is IStatusCodeHttpResult { StatusCode: null or StatusCodes.Status200OK })
            {
                SetHeaders(http.Response, tag);
            }
            return result;
        });

    public static string For(SiteRecord site, HttpContext context)
    {
        ArgumentNullException.ThrowIfNull(site);
        ArgumentNullException.ThrowIfNull(context);
        var services = context.RequestServices;
        var (data, model) = services.GetRequiredService<SiteVersions>().Get(site.Id);
        var step = SiteGridLoader.AlignDown(site, services.GetRequiredService<TimeProvider>().GetUtcNow());
        var request = context.Request;
        var key = string.Join('\n', ProcessEpoch, site.Id, site.UpdatedAt.UtcTicks, site.SettingsVersion, data, model,
            step.ToUnixTimeMilliseconds(), request.Path.Value, request.QueryString.Value, request.Headers.Accept.ToString());
        var hash = SHA256.HashData(Encoding.UTF8.GetBytes(key));
        return "\"" + Convert.ToBase64String(hash, 0, 16).TrimEnd('=').Replace('+', '-').Replace('/', '_') + "\"";
    }

    private static bool Matches(HttpRequest request, string tag)
    {
        var header = request.Headers.IfNoneMatch;
        if (header.Count == 0)
        {
            return false;
        }

        return EntityTagHeaderValue.TryParseList(header, out var tags)
            && tags.Any(t => t.Equals(EntityTagHeaderValue.Any) || t.Compare(new EntityTagHeaderValue(tag), useStrongComparison: false));
    }

    private static void SetHeaders(HttpResponse response, string tag)
    {
        response.Headers.ETag = tag;
        response.Headers.CacheControl = CacheControl;
        response.Headers.Vary = "Accept, Authorization";
    }
}

/// <summary>Marks endpoints that answer 304 to a matching <c>If-None-Match</c>, for the OpenAPI document.</summary>
public sealed class ConditionalGet;
