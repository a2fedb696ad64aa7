using ForecastHub.Api.Tests.TestSupport;
using YamlDotNet.RepresentationModel;

namespace ForecastHub.Api.Tests.Deployment;

public sealed class ComposeFileTests
{
    private static readonly YamlMappingNode Compose = Yaml.LoadDocuments(RepoFiles.PathOf("deploy", "docker-compose.yml")).Single();
    private static readonly YamlMappingNode Service = Compose.Map("services").Map("forecasthub");

    [Fact]
    public void ServiceBuildsFromTheRepositoryDockerfile()
    {
        var build = Service.Map("build");
        var context = Path.GetFullPath(Path.Combine(RepoFiles.PathOf("deploy"), build.Str("context")));

        Assert.Equal(Path.GetFullPath(RepoFiles.Root), context.TrimEnd(Path.DirectorySeparatorChar));
        Assert.True(File.Exists(Path.Combine(context, build.Str("dockerfile"))));
    }

    [Fact]
    public void ServiceRestartsUnlessStopped()
    {
        Assert.Contains(Service.Str("restart"), new[] { "unless-stopped", "always", "on-failure" });
    }

    [Fact]
    public void DataVolumeIsNamedDeclaredAndHoldsTheDatabase()
    {
        var mount = Service.Seq("volumes").Scalars().Single(v => v.EndsWith(":" + DeploymentFacts.DataDirectory, StringComparison.Ordinal));
        var volumeName = mount.Split(':')[0];

        Assert.True(Compose.Map("volumes").Has(volumeName), $"volume '{volumeName}' is not declared");
        Assert.StartsWith(DeploymentFacts.DataDirectory + "/", Service.Map("environment").Str("Storage__Path"), StringComparison.Ordinal);
    }

    [Fact]
    public void AdminKeyComesFromTheEnvironmentNotTheFile()
    {
        var adminKey = Service.Map("environment").Str("Auth__AdminKey");

        Assert.Matches(@"^\$\{[A-Z_]+(:-)?\}$", adminKey);
    }

    [Fact]
    public void PublishedPortReachesTheAppPort()
    {
        var ports = Service.Seq("ports").Scalars().ToList();

        Assert.Contains(ports, p => p.Split(':')[^1] == DeploymentFacts.HttpPort);
        Assert.Equal(DeploymentFacts.HttpPort, Service.Map("environment").Str("ASPNETCORE_HTTP_PORTS"));
    }

    [Fact]
    public void HealthCheckProbesReadiness()
    {
        var test = Service.Map("healthcheck").Seq("test").Scalars().ToList();

        Assert.Equal(["CMD", "dotnet", DeploymentFacts.AppDll, "healthcheck"], test.Take(4));
        Assert.EndsWith(":" + DeploymentFacts.HttpPort + DeploymentFacts.ReadyPath, test[4], StringComparison.Ordinal);
    }

    [Fact]
    public void ContainerDropsPrivileges()
    {
        Assert.Equal("true", Service.Str("read_only"));
        Assert.Contains("ALL", Service.Seq("cap_drop").Scalars());
        Assert.Contains("no-new-privileges:true", Service.Seq("security_opt").Scalars());
    }
}
