using System.Text.Json;

namespace ForecastHub.Api.Tests.Deployment;

/// <summary>One Dockerfile instruction after joining continuation lines; Words splits exec (JSON) or shell form.</summary>
internal sealed record DockerInstruction(string Keyword, string Arguments, int Line)
{
    public IReadOnlyList<string> Words =>
        Arguments.StartsWith('[')
            ? JsonSerializer.Deserialize<string[]>(Arguments) ?? []
            : Arguments.Split([' ', '\t'], StringSplitOptions.RemoveEmptyEntries);
}

/// <summary>A minimal Dockerfile reader: comments, blank lines and backslash continuations, as the builder treats them.</summary>
internal static class Dockerfile
{
    public static IReadOnlyList<DockerInstruction> Parse(string text)
    {
        var result = new List<DockerInstruction>();
        var pending = new List<string>();
        var startLine = 0;
        var lines = text.Replace("\r\n", "\n", StringComparison.Ordinal).Split('\n');
        for (var i = 0; i < lines.Length; i++)
        {
            var line = lines[i].Trim();
            if (line.Length == 0 || line.StartsWith('#'))
            {
                continue;
            }

            if (pending.Count == 0)
            {
                startLine = i + 1;
            }

            var continues = line.EndsWith('\\');
            pending.Add(continues ? line[..^1].Trim() : line);
            if (continues)
            {
                continue;
            }

            var joined = string.Join(' ', pending);
            pending.Clear();
            var space = joined.IndexOfAny([' ', '\t']);
            var keyword = space < 0 ? joined : joined[..space];
            var arguments = space < 0 ? "" : joined[(space + 1)..].Trim();
            result.Add(new DockerInstruction(keyword.ToUpperInvariant(), arguments, startLine));
        }

        if (pending.Count > 0)
        {
            throw new InvalidDataException($"Dockerfile ends inside a continued instruction starting at line {startLine}");
        }

        return result;
    }

    /// <summary>The instructions of the last stage (after the final FROM), which make the shipped image.</summary>
    public static IReadOnlyList<DockerInstruction> FinalStage(IReadOnlyList<DockerInstruction> all)
    {
        var lastFrom = all.Select((x, i) => (x, i)).Last(p => p.x.Keyword == "FROM").i;
        return all.Skip(lastFrom).ToList();
    }
}
