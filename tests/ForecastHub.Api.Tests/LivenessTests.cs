using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using ForecastHub.Api.Tests.Infrastructure;

namespace ForecastHub.Api.Tests;

public sealed class LivenessTests
{
    [Fact]
    public async Task LiveEndpointAnswersOkThroughThePipeline()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateClient();

        using var response = await client.GetAsync(new Uri("/health/live", UriKind.Relative));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
    }

    [Fact]
    public async Task ReadyEndpointReportsTheAppliedSchemaVersion()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateClient();

        var ready = await client.GetFromJsonAsync<JsonElement>(new Uri("/health/ready", UriKind.Relative));

        Assert.Equal("ready", ready.GetProperty("status").GetString());
        Assert.Equal(ForecastHub.Storage.Migrations.Migration.All[^1].Version, ready.GetProperty("schemaVersion").GetInt32());
    }
}
