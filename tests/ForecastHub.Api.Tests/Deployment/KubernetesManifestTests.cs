using ForecastHub.Api.Tests.TestSupport;
using YamlDotNet.RepresentationModel;

namespace ForecastHub.Api.Tests.Deployment;

public sealed class KubernetesManifestTests
{
    private static readonly string Folder = RepoFiles.PathOf("deploy", "kubernetes");

    private static readonly IReadOnlyList<YamlMappingNode> Objects = Directory.GetFiles(Folder, "*.yaml")
        .Where(f => Path.GetFileName(f) != "kustomization.yaml")
        .SelectMany(Yaml.LoadDocuments)
        .ToList();

    private static YamlMappingNode Kustomization => Yaml.LoadDocuments(Path.Combine(Folder, "kustomization.yaml")).Single();

    private static YamlMappingNode StatefulSet => Objects.Single(o => o.Str("kind") == "StatefulSet");

    private static YamlMappingNode Container => StatefulSet.Map("spec").Map("template").Map("spec").Seq("containers").Maps().Single();

    [Fact]
    public void EveryManifestIsAKubernetesObjectWithAName()
    {
        Assert.NotEmpty(Objects);
        Assert.All(Objects, o =>
        {
            Assert.False(string.IsNullOrEmpty(o.Str("apiVersion")));
            Assert.False(string.IsNullOrEmpty(o.Str("kind")));
            Assert.False(string.IsNullOrEmpty(o.Map("metadata").Str("name")));
        });
    }

    [Fact]
    public void KustomizationListsEveryManifestFile()
    {
        var listed = Kustomization.Seq("resources").Scalars().Order();
        var present = Directory.GetFiles(Folder, "*.yaml").Select(Path.GetFileName).Where(n => n != "kustomization.yaml").Order();

        Assert.Equal(present, listed);
    }

    [Fact]
    public void StatefulSetKeepsTheDatabaseOnAPersistentVolumeClaim()
    {
        var claim = StatefulSet.Map("spec").Seq("volumeClaimTemplates").Maps().Single();
        var mount = Container.Seq("volumeMounts").Maps().Single(m => m.Str("mountPath") == DeploymentFacts.DataDirectory);

        Assert.Equal(claim.Map("metadata").Str("name"), mount.Str("name"));
        Assert.Contains("ReadWriteOnce", claim.Map("spec").Seq("accessModes").Scalars());
        Assert.False(string.IsNullOrEmpty(claim.Map("spec").Map("resources").Map("requests").Str("storage")));
        Assert.StartsWith(DeploymentFacts.DataDirectory + "/", EnvValue("Storage__Path"), StringComparison.Ordinal);
        Assert.Equal("1", StatefulSet.Map("spec").Str("replicas"));
    }

    [Fact]
    public void ProbesAskTheHealthEndpointsOnTheNamedPort()
    {
        var port = Container.Seq("ports").Maps().Single();

        Assert.Equal(DeploymentFacts.HttpPort, port.Str("containerPort"));
        Assert.Equal(DeploymentFacts.HttpPort, EnvValue("ASPNETCORE_HTTP_PORTS"));
        Assert.Equal(DeploymentFacts.ReadyPath, Container.Map("readinessProbe").Map("httpGet").Str("path"));
        Assert.Equal(DeploymentFacts.LivePath, Container.Map("livenessProbe").Map("httpGet").Str("path"));
        foreach (var probe in new[] { "readinessProbe", "livenessProbe", "startupProbe" })
        {
            Assert.Equal(port.Str("name"), Container.Map(probe).Map("httpGet").Str("port"));
        }
    }

    [Fact]
    public void AdminKeyComesFromASecretThatKustomizeGeneratesFromAnIgnoredFile()
    {
        var reference = Container.Seq("env").Maps().Single(e => e.Str("name") == "Auth__AdminKey").Map("valueFrom").Map("secretKeyRef");
        var generator = Kustomization.Seq("secretGenerator").Maps().Single(g => g.Str("name") == reference.Str("name"));
        var envFile = generator.Seq("envs").Scalars().Single();
        var ignored = File.ReadAllLines(RepoFiles.PathOf(".gitignore"));

        Assert.Equal("admin-key", reference.Str("key"));
        Assert.Contains("deploy/kubernetes/" + envFile, ignored);
        Assert.DoesNotContain(Objects, o => o.Str("kind") == "Secret");
        Assert.Contains($"{reference.Str("key")}=", File.ReadAllText(Path.Combine(Folder, "kustomization.yaml")), StringComparison.Ordinal);
    }

    [Fact]
    public void ContainerDeclaresResourceRequestsAndRunsUnprivileged()
    {
        var requests = Container.Map("resources").Map("requests");
        var podSecurity = StatefulSet.Map("spec").Map("template").Map("spec").Map("securityContext");
        var containerSecurity = Container.Map("securityContext");

        Assert.False(string.IsNullOrEmpty(requests.Str("cpu")));
        Assert.False(string.IsNullOrEmpty(requests.Str("memory")));
        Assert.Equal("true", podSecurity.Str("runAsNonRoot"));
        Assert.NotEqual("0", podSecurity.Str("runAsUser"));
        Assert.Equal("false", containerSecurity.Str("allowPrivilegeEscalation"));
        Assert.Equal("true", containerSecurity.Str("readOnlyRootFilesystem"));
    }

    [Fact]
    public void ServicesSelectThePodAndTargetTheNamedPort()
    {
        var podLabels = StatefulSet.Map("spec").Map("template").Map("metadata").Map("labels");
        var services = Objects.Where(o => o.Str("kind") == "Service").ToList();
        var portName = Container.Seq("ports").Maps().Single().Str("name");

        Assert.Contains(services, s => s.Map("metadata").Str("name") == StatefulSet.Map("spec").Str("serviceName") && s.Map("spec").OptionalStr("clusterIP") == "None");
        Assert.All(services, s =>
        {
            foreach (var (key, value) in s.Map("spec").Map("selector").Children)
            {
                Assert.Equal(((YamlScalarNode)value).Value, podLabels.Str(((YamlScalarNode)key).Value!));
            }

            Assert.All(s.Map("spec").Seq("ports").Maps(), p => Assert.Equal(portName, p.Str("targetPort")));
        });
    }

    private static string EnvValue(string name) => Container.Seq("env").Maps().Single(e => e.Str("name") == name).Str("value");
}
