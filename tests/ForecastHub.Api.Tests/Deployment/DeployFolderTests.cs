using ForecastHub.Api.Tests.TestSupport;

namespace ForecastHub.Api.Tests.Deployment;

public sealed class DeployFolderTests
{
    [Fact]
    public void EveryYamlFileUnderDeployParses()
    {
        var files = Directory.GetFiles(RepoFiles.PathOf("deploy"), "*.*", SearchOption.AllDirectories)
            .Where(f => f.EndsWith(".yml", StringComparison.Ordinal) || f.EndsWith(".yaml", StringComparison.Ordinal))
            .ToList();

        Assert.True(files.Count >= 4, "expected the compose file and the Kubernetes manifests");
        Assert.All(files, f => Assert.NotEmpty(Yaml.LoadDocuments(f)));
    }
}
