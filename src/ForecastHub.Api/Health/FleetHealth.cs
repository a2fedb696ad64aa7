using ForecastHub.Core.Health;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Health;

/// <summary>Evaluates every site's health, keeping the latest summary for the metrics page.</summary>
public sealed class FleetHealth(ISiteStore sites, ModelHealthService health, TimeProvider clock)
{
    /// <summary>At most this many sites are listed under attention; the counts cover all.</summary>
    public const int AttentionCap = 200;

    private const int PageSize = 500;

    public FleetHealthResponse? Latest { get; private set; }

    /// <summary>Every site's state and newest reading as of <see cref="Latest"/>, ordered by site id.</summary>
    public IReadOnlyList<SiteHealthSample> LatestSites { get; private set; } = [];

    public async Task<FleetHealthResponse> ComputeAsync(CancellationToken cancellationToken)
    {
        var counts = HealthState.All.ToDictionary(s => s, _ => 0, StringComparer.Ordinal);
        var attention = new List<AttentionItem>();
        var samples = new List<SiteHealthSample>();
        var total = 0;
        string? after = null;
        while (true)
        {
            var page = await sites.ListAsync(after, PageSize, cancellationToken);
            foreach (var site in page)
            {
                var assessment = await health.EvaluateAsync(site, cancellationToken);
                counts[assessment.State]++;
                samples.Add(new SiteHealthSample(site.Id, assessment.State, assessment.LastObservationAt));
                total++;
                if (assessment.State != HealthState.Ok)
                {
                    attention.Add(new AttentionItem(site.Id, assessment.State,
                        [.. assessment.Reasons.Select(r => new HealthReasonResponse(r.Code, r.Message))]));
                }
            }

            if (page.Count < PageSize)
            {
                break;
            }

            after = page[^1].Id;
        }

        var ordered = attention.OrderBy(a => HealthState.Urgency(a.State)).ThenBy(a => a.SiteId, StringComparer.Ordinal).ToList();
        var result = new FleetHealthResponse(clock.GetUtcNow(), total, counts,
            [.. ordered.Take(AttentionCap)], ordered.Count > AttentionCap);
        LatestSites = samples;
        Latest = result;
        return result;
    }
}

/// <summary>One site's health state and newest reading time, for the per-site gauges.</summary>
public sealed record SiteHealthSample(string SiteId, string State, DateTimeOffset? LastObservationAt);
