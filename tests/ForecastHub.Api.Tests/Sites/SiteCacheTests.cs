using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using ForecastHub.Api.Sites;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Storage;
using ForecastHub.Storage.Sites;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Sites;

/// <summary>Site records kept in memory: every change and deletion is seen by the next read.</summary>
public sealed class SiteCacheTests
{
    private static Uri Site(string id) => new($"/api/v1/sites/{id}", UriKind.Relative);

    [Fact]
    public async Task ChangedSiteIsReadWithItsNewSettingsAfterItWasCached()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateSite(Some.Site("orchard-1"));
        (await client.GetAsync(Site("orchard-1"))).Dispose();

        using var patch = await client.PatchAsJsonAsync(Site("orchard-1"), new { timeZone = "Asia/Tokyo", name = "Renamed" });
        Assert.Equal(HttpStatusCode.OK, patch.StatusCode);
        var site = await client.GetFromJsonAsync<JsonElement>(Site("orchard-1"));

        Assert.Equal("Asia/Tokyo", site.GetProperty("timeZone").GetString());
        Assert.Equal("Renamed", site.GetProperty("name").GetString());
    }

    [Fact]
    public async Task DeletedSiteIsNotServedFromTheCache()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateSite(Some.Site("orchard-1"));
        (await client.GetAsync(Site("orchard-1"))).Dispose();
        (await client.GetAsync(new Uri("/api/v1/sites/orchard-1/forecast", UriKind.Relative))).Dispose();

        using var delete = await client.DeleteAsync(Site("orchard-1"));
        Assert.Equal(HttpStatusCode.NoContent, delete.StatusCode);

        await ProblemAssert.IsProblem(await client.GetAsync(Site("orchard-1")), HttpStatusCode.NotFound);
        await ProblemAssert.IsProblem(await client.GetAsync(new Uri("/api/v1/sites/orchard-1/forecast", UriKind.Relative)), HttpStatusCode.NotFound);
    }

    [Fact]
    public async Task SiteCreatedAgainAfterDeletionIsServedWithItsNewSettings()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        await client.CreateSite(Some.Site("orchard-1"));
        (await client.GetAsync(Site("orchard-1"))).Dispose();
        (await client.DeleteAsync(Site("orchard-1"))).Dispose();

        using var created = await client.CreateSite(Some.Site("orchard-1", cadence: "daily"));
        Assert.Equal(HttpStatusCode.Created, created.StatusCode);
        var site = await client.GetFromJsonAsync<JsonElement>(Site("orchard-1"));

        Assert.Equal("daily", site.GetProperty("cadence").GetString());
    }

    [Fact]
    public async Task RepeatedReadsAreServedFromMemory()
    {
        await using var factory = new ApiFactory();
        var (real, _) = await RealStoreAsync(factory);
        var counting = new ObservedSiteStore(real);
        var cache = new CachedSiteStore(counting);

        var first = await cache.GetAsync("orchard-1");
        var second = await cache.GetAsync("orchard-1");

        Assert.NotNull(first);
        Assert.Same(first, second);
        Assert.Equal(1, counting.Reads);
    }

    [Fact]
    public async Task ReadThatStartedBeforeAChangeDoesNotLeaveTheOldRecordCached()
    {
        await using var factory = new ApiFactory();
        var (real, _) = await RealStoreAsync(factory);
        var paused = new ObservedSiteStore(real) { PauseAfterRead = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously) };
        var cache = new CachedSiteStore(paused);

        // The read gets the old record from the database, then waits while the change is written.
        var slowRead = cache.GetAsync("orchard-1");
        await paused.ReadDone.Task.WaitAsync(TimeSpan.FromSeconds(30));
        await cache.UpdateAsync("orchard-1", s => s with { TimeZone = "Asia/Tokyo" });
        paused.PauseAfterRead.SetResult();
        var old = await slowRead;

        Assert.Equal("Europe/Berlin", old!.TimeZone);
        Assert.Equal("Asia/Tokyo", (await cache.GetAsync("orchard-1"))!.TimeZone);
    }

    // The real SQLite store of a started host, with one site in it.
    private static async Task<(ISiteStore Store, SqliteDatabase Database)> RealStoreAsync(ApiFactory factory)
    {
        using var client = factory.CreateAdminClient();
        using var created = await client.CreateSite(Some.Site("orchard-1"));
        Assert.Equal(HttpStatusCode.Created, created.StatusCode);
        var database = factory.Services.GetRequiredService<SqliteDatabase>();
        return (new SqliteSiteStore(database, factory.Clock), database);
    }

    /// <summary>The real store, counting reads and optionally holding a read's answer until released.</summary>
    private sealed class ObservedSiteStore(ISiteStore inner) : ISiteStore
    {
        public int Reads { get; private set; }

        public TaskCompletionSource? PauseAfterRead { get; init; }

        public TaskCompletionSource ReadDone { get; } = new(TaskCreationOptions.RunContinuationsAsynchronously);

        public async Task<SiteRecord?> GetAsync(string id, CancellationToken cancellationToken = default)
        {
            Reads++;
            var site = await inner.GetAsync(id, cancellationToken);
            ReadDone.TrySetResult();
            if (PauseAfterRead is not null)
            {
                await PauseAfterRead.Task;
            }

            return site;
        }

        public Task<bool> CreateAsync(SiteRecord site, CancellationToken cancellationToken = default) => inner.CreateAsync(site, cancellationToken);

        public Task<IReadOnlyList<SiteRecord>> ListAsync(string? afterId, int limit, CancellationToken cancellationToken = default) =>
            inner.ListAsync(afterId, limit, cancellationToken);

        public Task<SiteRecord?> UpdateAsync(string id, Func<SiteRecord, SiteRecord?> change, CancellationToken cancellationToken = default) =>
            inner.UpdateAsync(id, change, cancellationToken);

        public Task<bool> DeleteAsync(string id, CancellationToken cancellationToken = default) => inner.DeleteAsync(id, cancellationToken);
    }
}
