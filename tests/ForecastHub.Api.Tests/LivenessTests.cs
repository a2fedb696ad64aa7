using System.Net;
using Microsoft.AspNetCore.Mvc.Testing;

namespace ForecastHub.Api.Tests;

public sealed class LivenessTests
{
    [Fact]
    public async Task LiveEndpointAnswersOkThroughThePipeline()
    {
        await using var factory = new WebApplicationFactory<Program>();
        using var client = factory.CreateClient();

        using var response = await client.GetAsync(new Uri("/health/live", UriKind.Relative));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
    }
}
