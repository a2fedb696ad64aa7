using ForecastHub.Api.Tests.TestSupport;

namespace ForecastHub.Api.Tests.Deployment;

public sealed class DockerfileTests
{
    private static readonly IReadOnlyList<DockerInstruction> All = Dockerfile.Parse(RepoFiles.Read("Dockerfile"));
    private static readonly IReadOnlyList<DockerInstruction> Final = Dockerfile.FinalStage(All);

    [Fact]
    public void BuildIsMultiStageFromSdkToAspNetRuntime()
    {
        var froms = All.Where(i => i.Keyword == "FROM").ToList();

        Assert.True(froms.Count >= 2, "expected a build stage and a runtime stage");
        Assert.StartsWith("mcr.microsoft.com/dotnet/sdk:", froms[0].Words[0], StringComparison.Ordinal);
        Assert.StartsWith("mcr.microsoft.com/dotnet/aspnet:", froms[^1].Words[0], StringComparison.Ordinal);
        var buildStage = froms[0].Words[^1];
        Assert.Contains(Final, i => i.Keyword == "COPY" && i.Arguments.StartsWith($"--from={buildStage} ", StringComparison.Ordinal));
    }

    [Fact]
    public void CopiedProjectFilesExistInTheRepository()
    {
        var sources = All
            .Where(i => i.Keyword == "COPY" && !i.Arguments.StartsWith("--from", StringComparison.Ordinal))
            .SelectMany(i => i.Words.SkipLast(1))
            .ToList();

        Assert.NotEmpty(sources);
        Assert.All(sources, s => Assert.True(
            File.Exists(RepoFiles.PathOf(s)) || Directory.Exists(RepoFiles.PathOf(s)), $"Dockerfile copies '{s}', which does not exist"));
    }

    [Fact]
    public void RuntimeImageRunsAsNonRootUser()
    {
        var user = Final.LastOrDefault(i => i.Keyword == "USER");

        Assert.NotNull(user);
        var name = user.Words[0].Split(':')[0];
        Assert.DoesNotContain(name, new[] { "0", "root" });
        var userIndex = Final.ToList().IndexOf(user);
        var entryIndex = Final.Select((x, i) => (x, i)).Single(p => p.x.Keyword == "ENTRYPOINT").i;
        Assert.True(userIndex < entryIndex, "USER must come before ENTRYPOINT");
    }

    [Fact]
    public void RuntimeImageExposesTheConfiguredPort()
    {
        var port = EnvironmentValue("ASPNETCORE_HTTP_PORTS");

        Assert.Equal(DeploymentFacts.HttpPort, port);
        Assert.Contains(Final, i => i.Keyword == "EXPOSE" && i.Words.Contains(port));
    }

    [Fact]
    public void DatabaseLivesOnTheDataVolume()
    {
        var volume = Final.Single(i => i.Keyword == "VOLUME");

        Assert.Contains(DeploymentFacts.DataDirectory, volume.Words);
        Assert.StartsWith(DeploymentFacts.DataDirectory + "/", EnvironmentValue("Storage__Path"), StringComparison.Ordinal);
    }

    [Fact]
    public void HealthCheckProbesReadinessWithTheAppsOwnVerb()
    {
        var check = Final.Single(i => i.Keyword == "HEALTHCHECK");
        var command = check.Arguments[(check.Arguments.IndexOf("CMD ", StringComparison.Ordinal) + 4)..];
        var words = new DockerInstruction("CMD", command.Trim(), check.Line).Words;

        Assert.Equal(["dotnet", DeploymentFacts.AppDll, "healthcheck"], words.Take(3));
        Assert.Equal(new Uri($"http://127.0.0.1:{DeploymentFacts.HttpPort}{DeploymentFacts.ReadyPath}"), new Uri(words[3]));
    }

    [Fact]
    public void EntryPointStartsThePublishedApi()
    {
        var entry = Final.Single(i => i.Keyword == "ENTRYPOINT");

        Assert.Equal(["dotnet", DeploymentFacts.AppDll], entry.Words);
    }

    private static string EnvironmentValue(string name)
    {
        var pairs = Final.Where(i => i.Keyword == "ENV")
            .SelectMany(i => i.Words)
            .Select(w => w.Split('=', 2))
            .Where(p => p.Length == 2);
        return pairs.Single(p => p[0] == name)[1];
    }
}
