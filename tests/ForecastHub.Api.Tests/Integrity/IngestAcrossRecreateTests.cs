using System.Net;
using ForecastHub.Api.Hosting;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Models;
using ForecastHub.Storage.Sites;
using ForecastHub.TestData;
using Microsoft.AspNetCore.Http;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.Integrity;

/// <summary>A POST of observations that read its site before the site was deleted and created again
/// stores nothing in the new site: the write carries the internal key the batch was checked against.</summary>
public sealed class IngestAcrossRecreateTests
{
    private const int Repetitions = 8;

    [Fact]
    public async Task APostThatReadTheDeletedSiteWritesNothingIntoTheSiteCreatedAgain()
    {
        var gate = new SiteReadGate();
        await using var factory = new ApiFactory
        {
            TestServices = services =>
            {
                services.AddHttpContextAccessor();
                services.Decorate<ISiteStore>((sp, inner) => new GatedSiteStore(inner, gate, sp.GetRequiredService<IHttpContextAccessor>()));
            },
        };
        using var client = factory.CreateAdminClient();
        var history = SyntheticSeries.HourlyUntil(factory.Clock.GetUtcNow(), 48, seed: 3);

        for (var i = 0; i < Repetitions; i++)
        {
            await client.CreateHourlySiteAsync("x");
            var (resolved, release) = gate.Arm();
            var post = client.PostReadings(history, "x");

            // The POST has read site x and is held before its write; x is deleted and created again meanwhile.
            await resolved.WaitAsync(ModelScenario.Patience);
            using (var deleted = await client.DeleteAsync(new Uri("/api/v1/sites/x", UriKind.Relative)))
            {
                Assert.Equal(HttpStatusCode.NoContent, deleted.StatusCode);
            }

            await client.CreateHourlySiteAsync("x");
            release.SetResult();

            using var answer = await post.WaitAsync(ModelScenario.Patience);
            var problem = await ProblemAssert.IsProblem(answer, HttpStatusCode.NotFound);
            Assert.Contains("was deleted while this request was being stored", problem.GetProperty("detail").GetString(), StringComparison.Ordinal);
            Assert.Empty(await client.AllReadings("x"));

            // The same POST now, for the new site, is stored.
            using (var again = await client.PostReadings(history, "x"))
            {
                Assert.Equal(HttpStatusCode.OK, again.StatusCode);
            }

            Assert.Equal(history.Count, (await client.AllReadings("x")).Count);
            using var cleanup = await client.DeleteAsync(new Uri("/api/v1/sites/x", UriKind.Relative));
            Assert.Equal(HttpStatusCode.NoContent, cleanup.StatusCode);
        }
    }

    /// <summary>Holds the next site read of a POST of observations after the real store answered it, until released.</summary>
    private sealed class SiteReadGate
    {
        private Armed? armed;

        public (Task Resolved, TaskCompletionSource Release) Arm()
        {
            var next = new Armed(new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously), new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously));
            Volatile.Write(ref armed, next);
            return (next.Resolved.Task, next.Release);
        }

        public Task PassAsync()
        {
            if (Interlocked.Exchange(ref armed, null) is not { } taken)
            {
                return Task.CompletedTask;
            }

            taken.Resolved.SetResult();
            return taken.Release.Task;
        }

        private sealed record Armed(TaskCompletionSource Resolved, TaskCompletionSource Release);
    }

    private sealed class GatedSiteStore(ISiteStore inner, SiteReadGate gate, IHttpContextAccessor http) : ISiteStore
    {
        public Task<bool> CreateAsync(SiteRecord site, CancellationToken cancellationToken = default) => inner.CreateAsync(site, cancellationToken);

        public async Task<SiteRecord?> GetAsync(string id, CancellationToken cancellationToken = default)
        {
            var site = await inner.GetAsync(id, cancellationToken);
            if (http.HttpContext?.Request is { Method: "POST" } request && request.Path.Value!.EndsWith("/observations", StringComparison.Ordinal))
            {
                await gate.PassAsync();
            }

            return site;
        }

        public Task<IReadOnlyList<SiteRecord>> ListAsync(string? afterId, int limit, CancellationToken cancellationToken = default) =>
            inner.ListAsync(afterId, limit, cancellationToken);

        public Task<SiteRecord?> UpdateAsync(string id, Func<SiteRecord, SiteRecord?> change, CancellationToken cancellationToken = default) =>
            inner.UpdateAsync(id, change, cancellationToken);

        public Task<bool> DeleteAsync(string id, CancellationToken cancellationToken = default) => inner.DeleteAsync(id, cancellationToken);
    }
}
