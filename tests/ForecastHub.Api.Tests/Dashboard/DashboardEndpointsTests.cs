using System.Net;
using ForecastHub.Api.Tests.Infrastructure;

namespace ForecastHub.Api.Tests.Dashboard;

public sealed class DashboardEndpointsTests
{
    [Fact]
    public async Task RootServesTheDashboardPageWithItsScriptsAndStyles()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateClient();

        using var response = await client.GetAsync(new Uri("/", UriKind.Relative));
        var html = await response.Content.ReadAsStringAsync();

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("text/html", response.Content.Headers.ContentType?.MediaType);
        Assert.Contains("<script src=\"/dashboard/app.js\"", html, StringComparison.Ordinal);
        Assert.Contains("cannot see an approaching front", html, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("app.js", "text/javascript")]
    [InlineData("charts.js", "text/javascript")]
    [InlineData("app.css", "text/css")]
    [InlineData("icon.svg", "image/svg+xml")]
    public async Task EveryAssetThePageNamesIsServedWithItsType(string file, string mediaType)
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateClient();

        using var response = await client.GetAsync(new Uri($"/dashboard/{file}", UriKind.Relative));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal(mediaType, response.Content.Headers.ContentType?.MediaType);
        Assert.True((await response.Content.ReadAsByteArrayAsync()).Length > 100);
    }

    [Fact]
    public async Task UnknownAssetIsAProblemNotAFile()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateClient();

        using var response = await client.GetAsync(new Uri("/dashboard/..%2Fappsettings.json", UriKind.Relative));

        Assert.Equal(HttpStatusCode.NotFound, response.StatusCode);
        Assert.Equal("application/problem+json", response.Content.Headers.ContentType?.MediaType);
    }
}
