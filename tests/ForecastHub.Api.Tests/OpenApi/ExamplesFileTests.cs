using System.Text.RegularExpressions;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.TestSupport;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.OpenApi;

public sealed partial class ExamplesFileTests
{
    [Fact]
    public async Task EveryExampleCallsAnEndpointTheAppMaps()
    {
        var examples = RequestLine().Matches(RepoFiles.Read("openapi", "examples.http"))
            .Select(m => (Method: m.Groups["method"].Value, Path: m.Groups["path"].Value.Split('?')[0]))
            .ToList();
        await using var factory = new ApiFactory();
        _ = factory.Server;
        var routes = factory.Services.GetRequiredService<EndpointDataSource>().Endpoints.OfType<RouteEndpoint>()
            .SelectMany(e => e.Metadata.GetMetadata<HttpMethodMetadata>()!.HttpMethods
                .Select(m => (Method: m, Pattern: new Regex("^/" + ParameterPattern().Replace(e.RoutePattern.RawText!.Trim('/'), "[^/]+") + "/?$"))))
            .ToList();

        Assert.True(examples.Count >= 10, "expected the example calls of openapi/examples.http");
        Assert.All(examples, example => Assert.True(
            example.Path.StartsWith("/swagger/", StringComparison.Ordinal)
            || routes.Any(r => r.Method == example.Method && r.Pattern.IsMatch(example.Path)),
            $"examples.http calls {example.Method} {example.Path}, which the app does not map"));
    }

    [GeneratedRegex(@"^(?<method>GET|POST|PUT|PATCH|DELETE) \{\{host\}\}(?<path>\S+)$", RegexOptions.Multiline)]
    private static partial Regex RequestLine();

    [GeneratedRegex(@"\{[^}]+\}")]
    private static partial Regex ParameterPattern();
}
