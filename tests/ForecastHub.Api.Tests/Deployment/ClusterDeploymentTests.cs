using ForecastHub.Api.Tests.TestSupport;
using YamlDotNet.RepresentationModel;

namespace ForecastHub.Api.Tests.Deployment;

/// <summary>The PostgreSQL mode's deployment files: a compose file with PostgreSQL and two API nodes,
/// and Kubernetes manifests with a Deployment of several replicas.</summary>
public sealed class ClusterDeploymentTests
{
    private static readonly YamlMappingNode Compose = Yaml.LoadDocuments(RepoFiles.PathOf("deploy", "docker-compose.postgres.yml")).Single();

    private static readonly string KubernetesFolder = RepoFiles.PathOf("deploy", "kubernetes-postgres");

    private static readonly IReadOnlyList<YamlMappingNode> Objects = Directory.GetFiles(KubernetesFolder, "*.yaml")
        .Where(f => Path.GetFileName(f) != "kustomization.yaml")
        .SelectMany(Yaml.LoadDocuments)
        .ToList();

    private static YamlMappingNode Deployment => Objects.Single(o => o.Str("kind") == "Deployment");

    private static YamlMappingNode Container => Deployment.Map("spec").Map("template").Map("spec").Seq("containers").Maps().Single();

    private static IEnumerable<YamlMappingNode> ApiNodes => Compose.Map("services").Children
        .Where(c => ((YamlScalarNode)c.Key).Value != "postgres").Select(c => (YamlMappingNode)c.Value);

    [Fact]
    public void ComposeRunsTwoApiNodesOnTheOnePostgresService()
    {
        var postgres = Compose.Map("services").Map("postgres");
        var volume = postgres.Seq("volumes").Scalars().Single().Split(':')[0];

        Assert.Equal(2, ApiNodes.Count());
        Assert.True(Compose.Map("volumes").Has(volume));
        Assert.Equal("pg_isready", postgres.Map("healthcheck").Seq("test").Scalars().ElementAt(1));
        Assert.All(ApiNodes, node =>
        {
            var environment = node.Map("environment");
            Assert.Equal("postgres", environment.Str("Storage__Provider"));
            Assert.StartsWith("Host=postgres;", environment.Str("Storage__ConnectionString"), StringComparison.Ordinal);
            Assert.Equal("service_healthy", node.Map("depends_on").Map("postgres").Str("condition"));
            Assert.Matches(@"^\$\{[A-Z_]+(:[-?][^}]*)?\}$", environment.Str("Auth__AdminKey"));
            Assert.Equal(DeploymentFacts.HttpPort, environment.Str("ASPNETCORE_HTTP_PORTS"));
            Assert.EndsWith(":" + DeploymentFacts.HttpPort + DeploymentFacts.ReadyPath, node.Map("healthcheck").Seq("test").Scalars().Last(), StringComparison.Ordinal);
            Assert.Equal("true", node.Str("read_only"));
            Assert.Contains("ALL", node.Seq("cap_drop").Scalars());
        });
        Assert.Equal(2, ApiNodes.Select(n => n.Map("environment").Str("Cluster__NodeName")).Distinct().Count());
        Assert.Equal(2, ApiNodes.Select(n => n.Seq("ports").Scalars().Single().Split(':')[0]).Distinct().Count());
    }

    [Fact]
    public void KustomizationListsEveryManifestFile()
    {
        var listed = Yaml.LoadDocuments(Path.Combine(KubernetesFolder, "kustomization.yaml")).Single().Seq("resources").Scalars().Order();
        var present = Directory.GetFiles(KubernetesFolder, "*.yaml").Select(Path.GetFileName).Where(n => n != "kustomization.yaml").Order();

        Assert.Equal(present, listed);
    }

    [Fact]
    public void PostgresModeIsADeploymentOfSeveralStatelessReplicas()
    {
        var replicas = int.Parse(Deployment.Map("spec").Str("replicas"), System.Globalization.CultureInfo.InvariantCulture);
        var podSpec = Deployment.Map("spec").Map("template").Map("spec");

        Assert.True(replicas >= 2, $"{replicas} replica(s)");
        Assert.Equal("postgres", Env("Storage__Provider").Str("value"));
        Assert.False(Deployment.Map("spec").Has("volumeClaimTemplates"));
        Assert.DoesNotContain(Container.Seq("volumeMounts").Maps(), m => m.Str("mountPath") == DeploymentFacts.DataDirectory);
        Assert.Equal("metadata.name", Env("Cluster__NodeName").Map("valueFrom").Map("fieldRef").Str("fieldPath"));
        Assert.Equal("true", podSpec.Map("securityContext").Str("runAsNonRoot"));
        Assert.Equal("true", Container.Map("securityContext").Str("readOnlyRootFilesystem"));
    }

    [Fact]
    public void SecretsAndProbesAreWiredUp()
    {
        foreach (var name in new[] { "Storage__ConnectionString", "Auth__AdminKey" })
        {
            var reference = Env(name).Map("valueFrom").Map("secretKeyRef");
            var secret = Objects.Single(o => o.Str("kind") == "Secret" && o.Map("metadata").Str("name") == reference.Str("name"));
            Assert.True(secret.Map("stringData").Has(reference.Str("key")), $"secret lacks key '{reference.Str("key")}'");
        }

        var port = Container.Seq("ports").Maps().Single();
        Assert.Equal(DeploymentFacts.HttpPort, port.Str("containerPort"));
        Assert.Equal(DeploymentFacts.ReadyPath, Container.Map("readinessProbe").Map("httpGet").Str("path"));
        Assert.Equal(DeploymentFacts.ReadyPath, Container.Map("startupProbe").Map("httpGet").Str("path"));
        Assert.Equal(DeploymentFacts.LivePath, Container.Map("livenessProbe").Map("httpGet").Str("path"));
        var service = Objects.Single(o => o.Str("kind") == "Service");
        var podLabels = Deployment.Map("spec").Map("template").Map("metadata").Map("labels");
        foreach (var (key, value) in service.Map("spec").Map("selector").Children)
        {
            Assert.Equal(((YamlScalarNode)value).Value, podLabels.Str(((YamlScalarNode)key).Value!));
        }
        Assert.All(service.Map("spec").Seq("ports").Maps(), p => Assert.Equal(port.Str("name"), p.Str("targetPort")));
    }

    private static YamlMappingNode Env(string name) => Container.Seq("env").Maps().Single(e => e.Str("name") == name);
}
