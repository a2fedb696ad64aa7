namespace ForecastHub.Api.Http;

/// <summary>A page of a list whose body names the next page, if any.</summary>
public interface IPagedList
{
    string? Next { get; }
}

/// <summary>Adds <c>Link: &lt;next&gt;; rel="next"</c> to list answers whose body has a next page.</summary>
public static class NextLink
{
    public static TBuilder WithNextLinkHeader<TBuilder>(this TBuilder builder)
        where TBuilder : IEndpointConventionBuilder =>
        builder.AddEndpointFilter(async (context, next) =>
        {
            var result = await next(context);
            var answer = result is INestedHttpResult nested ? nested.Result : result;
            if (answer is IValueHttpResult { Value: IPagedList { Next: { } link } })
            {
                Set(context.HttpContext.Response, link);
            }
            return result;
        });

    public static void Set(HttpResponse response, string? next)
    {
        ArgumentNullException.ThrowIfNull(response);
        if (next is not null)
        {
            response.Headers.Link = $"<{next}>; rel=\"next\"";
        }
    }
}
