using System.Text.RegularExpressions;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.TestSupport;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Deployment;

public sealed partial class ProbePathTests
{
    [Fact]
    public async Task EveryHealthPathTheDeployFilesProbeIsAnEndpointOfTheApp()
    {
        var files = new[] { RepoFiles.PathOf("Dockerfile") }
            .Concat(Directory.GetFiles(RepoFiles.PathOf("deploy"), "*.y*ml", SearchOption.AllDirectories));
        var probed = files.SelectMany(f => HealthPath().Matches(File.ReadAllText(f)).Select(m => m.Value)).ToHashSet();
        await using var factory = new ApiFactory();
        _ = factory.Server;

        var mapped = factory.Services.GetRequiredService<EndpointDataSource>().Endpoints
            .OfType<RouteEndpoint>()
            .Where(e => e.Metadata.GetMetadata<HttpMethodMetadata>()?.HttpMethods.Contains("GET") == true)
            .Select(e => "/" + e.RoutePattern.RawText?.Trim('/'))
            .ToHashSet();

        Assert.Equal([DeploymentFacts.LivePath, DeploymentFacts.ReadyPath], probed.Order(StringComparer.Ordinal));
        Assert.Subset(mapped, probed);
    }

    [GeneratedRegex(@"/health/[a-z]+")]
    private static partial Regex HealthPath();
}
