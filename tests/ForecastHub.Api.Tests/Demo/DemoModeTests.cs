using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using ForecastHub.Api.Demo;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Storage.Readings;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Mvc.Testing;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Demo;

public sealed class DemoModeTests
{
    private static WebApplicationFactory<Program> Demo(ApiFactory factory) =>
        factory.WithWebHostBuilder(b => b.UseSetting("Demo:Enabled", "true"));

    private static async Task<int> StoredReadings(WebApplicationFactory<Program> app, string siteId)
    {
        var store = app.Services.GetRequiredService<IReadingStore>();
        var all = await store.ReadAsync(siteId, long.MinValue, long.MaxValue, null, 100_000);
        return all!.Count;
    }

    [Fact]
    public async Task DemoLoadsEveryGeneratedReadingOfTheFiveSitesIntoTheConfiguredFile()
    {
        await using var factory = new ApiFactory();
        await using var app = Demo(factory);
        using var client = app.CreateClient();

        using var response = await client.GetAsync(new Uri("/api/v1/sites", UriKind.Relative));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var body = await response.Content.ReadFromJsonAsync<JsonElement>();
        var ids = body.GetProperty("sites").EnumerateArray().Select(s => s.GetProperty("id").GetString()).ToList();
        Assert.Equal(DemoScenario.Sites.Select(s => s.Id).Order(), ids.Order());
        var generated = DemoSeriesGenerator.Generate(ApiFactory.Now);
        foreach (var series in generated)
        {
            Assert.Equal(series.Readings.Count, await StoredReadings(app, series.Site.Id));
        }
        Assert.True(new FileInfo(factory.DatabasePath).Exists);
    }

    [Fact]
    public async Task DemoReadsNeedNoKeyButWritesNeedTheAdminKey()
    {
        await using var factory = new ApiFactory();
        await using var app = Demo(factory);
        using var anonymous = app.CreateClient();
        using var admin = app.CreateClient();
        admin.DefaultRequestHeaders.Authorization = new("Bearer", ApiFactory.AdminKey);

        using var read = await anonymous.GetAsync(new Uri("/api/v1/sites/ambrel-low", UriKind.Relative));
        using var anonymousWrite = await anonymous.CreateSite(Some.Site("north-block"));
        using var adminWrite = await admin.CreateSite(Some.Site("north-block"));

        Assert.Equal(HttpStatusCode.OK, read.StatusCode);
        Assert.Equal(HttpStatusCode.Unauthorized, anonymousWrite.StatusCode);
        Assert.Equal(HttpStatusCode.Created, adminWrite.StatusCode);
    }

    [Fact]
    public async Task RestartingTheDemoRenewsItsSitesAndKeepsOtherSites()
    {
        await using var factory = new ApiFactory();
        await using (var first = Demo(factory))
        {
            using var admin = first.CreateClient();
            admin.DefaultRequestHeaders.Authorization = new("Bearer", ApiFactory.AdminKey);
            using var created = await admin.CreateSite(Some.Site("north-block"));
            Assert.Equal(HttpStatusCode.Created, created.StatusCode);
        }

        await using var second = Demo(factory);
        using var client = second.CreateClient();
        using var own = await client.GetAsync(new Uri("/api/v1/sites/north-block", UriKind.Relative));

        Assert.Equal(HttpStatusCode.OK, own.StatusCode);
        var expected = DemoSeriesGenerator.Generate(ApiFactory.Now).Single(s => s.Site.Id == "ambrel-low").Readings.Count;
        Assert.Equal(expected, await StoredReadings(second, "ambrel-low"));
    }

    [Fact]
    public async Task WithoutDemoModeNoDemoSiteExists()
    {
        await using var factory = new ApiFactory { AllowAnonymousRead = true };
        using var client = factory.CreateClient();

        using var response = await client.GetAsync(new Uri("/api/v1/sites/ambrel-low", UriKind.Relative));

        Assert.Equal(HttpStatusCode.NotFound, response.StatusCode);
    }

    [Fact]
    public void DemoFlagIsTakenOutSoItCannotSwallowTheNextArgument()
    {
        var rest = DemoMode.WithoutFlag(["--demo", "--urls", "http://127.0.0.1:5001", "--Storage:Path=x.db"], out var present);
        var none = DemoMode.WithoutFlag(["--urls=http://127.0.0.1:5001"], out var absent);

        Assert.True(present);
        Assert.Equal(["--urls", "http://127.0.0.1:5001", "--Storage:Path=x.db"], rest);
        Assert.False(absent);
        Assert.Equal(["--urls=http://127.0.0.1:5001"], none);
    }
}
