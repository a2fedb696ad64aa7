using ForecastHub.Api.Hosting;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Cluster;

public static class ClusterSetup
{
    /// <summary>Several nodes on one database: work leases for refits and sweeps, and change notices that drop other nodes' caches.</summary>
    public static IServiceCollection AddCluster(this IServiceCollection services)
    {
        services.AddOptions<ClusterOptions>().BindConfiguration(ClusterOptions.SectionName).ValidateOnStart();
        services.AddSingleton<IValidateOptions<ClusterOptions>>(new ThrowingValidator<ClusterOptions>(o => o.Validate()));
        services.AddSingleton<WorkLeaseRunner>();
        services.AddSingleton<NodeCaches>();
        services.AddHostedService<ChangeListener>();
        return services;
    }
}
