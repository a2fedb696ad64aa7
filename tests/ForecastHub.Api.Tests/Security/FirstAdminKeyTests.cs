using System.Net;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Keys;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Security;

public sealed class FirstAdminKeyTests
{
    [Fact]
    public async Task FirstStartWithoutAConfiguredKeyPrintsAWorkingAdminKeyOnce()
    {
        var database = TestFiles.NewDatabasePath();
        using var firstOutput = new StringWriter();
        using var secondOutput = new StringWriter();
        string secret;
        await using (var first = UnconfiguredFactory(database, firstOutput))
        {
            using var client = first.CreateClient();
            secret = firstOutput.ToString().Split('\n', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries)[^1];
            using var response = await client.SendAsync(new HttpRequestMessage(HttpMethod.Get, KeyApi.Keys).With(secret));

            Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        }

        await using (var second = UnconfiguredFactory(database, secondOutput))
        {
            using var client = second.CreateClient();
            using var response = await client.SendAsync(new HttpRequestMessage(HttpMethod.Get, KeyApi.Keys).With(secret));

            Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        }
        TestFiles.DeleteDatabase(database);

        Assert.StartsWith("fhk_", secret, StringComparison.Ordinal);
        Assert.Equal("", secondOutput.ToString());
    }

    [Fact]
    public async Task ConfiguredAdminKeyMeansNothingIsGenerated()
    {
        using var output = new StringWriter();
        await using var factory = new ApiFactory { TestServices = s => s.AddSingleton(new FirstAdminKeyOutput(output)) };
        using var admin = factory.CreateAdminClient();

        using var response = await admin.GetAsync(KeyApi.Keys);

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("", output.ToString());
        Assert.Contains("\"keys\":[]", await response.Content.ReadAsStringAsync(), StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("short")]
    [InlineData("replace-me")]
    public async Task ShortConfiguredAdminKeyStopsTheStart(string adminKey)
    {
        await using var factory = new ApiFactory { Settings = new Dictionary<string, string?> { ["Auth:AdminKey"] = adminKey } };

        var error = Assert.ThrowsAny<Exception>(() => factory.CreateClient());

        Assert.Contains("Auth:AdminKey", error.ToString(), StringComparison.Ordinal);
    }

    private static ApiFactory UnconfiguredFactory(string database, StringWriter output) => new()
    {
        DatabasePath = database,
        KeepDatabase = true,
        Settings = new Dictionary<string, string?> { ["Auth:AdminKey"] = "" },
        TestServices = s => s.AddSingleton(new FirstAdminKeyOutput(output)),
    };
}
