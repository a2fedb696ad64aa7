namespace ForecastHub.Api.Cluster;

/// <summary>Configuration section <c>Cluster</c>: how this node shares background work with the others.</summary>
public sealed class ClusterOptions
{
    public const string SectionName = "Cluster";

    /// <summary>This node's name in work leases; empty means host name and process id.</summary>
    public string NodeName { get; set; } = "";

    /// <summary>How long a lease on a site's background work runs before another node may take it over (renewed while the work runs).</summary>
    public TimeSpan LeaseDuration { get; set; } = TimeSpan.FromSeconds(60);

    public string ResolvedNodeName =>
        NodeName.Length > 0 ? NodeName : $"{Environment.MachineName}-{Environment.ProcessId}";

    public void Validate()
    {
        if (LeaseDuration < TimeSpan.FromSeconds(1) || LeaseDuration > TimeSpan.FromHours(1))
        {
            throw new ArgumentException("Cluster:LeaseDuration must be from 00:00:01 to 01:00:00.", nameof(LeaseDuration));
        }

        if (NodeName.Length > 200)
        {
            throw new ArgumentException("Cluster:NodeName may be at most 200 characters.", nameof(NodeName));
        }
    }
}
