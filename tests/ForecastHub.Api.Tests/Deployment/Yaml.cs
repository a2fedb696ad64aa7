using YamlDotNet.RepresentationModel;

namespace ForecastHub.Api.Tests.Deployment;

/// <summary>Loads YAML files into node trees and navigates them with readable failures.</summary>
internal static class Yaml
{
    public static IReadOnlyList<YamlMappingNode> LoadDocuments(string path)
    {
        var stream = new YamlStream();
        using (var reader = new StreamReader(path))
        {
            stream.Load(reader);
        }

        return stream.Documents
            .Select(d => d.RootNode as YamlMappingNode ?? throw new InvalidDataException($"{Path.GetFileName(path)}: a document is not a mapping"))
            .ToList();
    }

    public static YamlMappingNode Map(this YamlNode node, string key) =>
        node.Child(key) as YamlMappingNode ?? throw new KeyNotFoundException($"'{key}' is not a mapping");

    public static YamlSequenceNode Seq(this YamlNode node, string key) =>
        node.Child(key) as YamlSequenceNode ?? throw new KeyNotFoundException($"'{key}' is not a sequence");

    public static string Str(this YamlNode node, string key) =>
        (node.Child(key) as YamlScalarNode)?.Value ?? throw new KeyNotFoundException($"'{key}' is not a scalar");

    public static string? OptionalStr(this YamlNode node, string key) =>
        node is YamlMappingNode map && map.Children.TryGetValue(new YamlScalarNode(key), out var child) ? (child as YamlScalarNode)?.Value : null;

    public static bool Has(this YamlNode node, string key) =>
        node is YamlMappingNode map && map.Children.ContainsKey(new YamlScalarNode(key));

    public static IEnumerable<YamlMappingNode> Maps(this YamlSequenceNode sequence) => sequence.Children.OfType<YamlMappingNode>();

    public static IEnumerable<string> Scalars(this YamlSequenceNode sequence) =>
        sequence.Children.OfType<YamlScalarNode>().Select(s => s.Value ?? "");

    private static YamlNode Child(this YamlNode node, string key)
    {
        if (node is YamlMappingNode map && map.Children.TryGetValue(new YamlScalarNode(key), out var child))
        {
            return child;
        }

        throw new KeyNotFoundException($"key '{key}' missing at line {node.Start.Line}");
    }
}
