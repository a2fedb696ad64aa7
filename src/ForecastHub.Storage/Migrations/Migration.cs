using System.Globalization;
using System.Text.RegularExpressions;

namespace ForecastHub.Storage.Migrations;

/// <summary>One numbered schema step. Migrations are the embedded files
/// <c>Migrations/NNNN_name.sql</c> of this assembly, applied in order of their number.</summary>
public sealed partial record Migration(int Version, string Name, string Sql)
{
    /// <summary>A migration whose first line is <c>-- foreign_keys: off</c> rebuilds a parent table and
    /// runs with foreign keys off (checked before its commit).</summary>
    public bool ForeignKeysOff => Sql.StartsWith("-- foreign_keys: off", StringComparison.Ordinal);

    /// <summary>Every migration shipped with this build, ordered by version.</summary>
    public static IReadOnlyList<Migration> All { get; } = LoadEmbedded();

    private static Migration[] LoadEmbedded()
    {
        var assembly = typeof(Migration).Assembly;
        var migrations = new List<Migration>();
        foreach (var resource in assembly.GetManifestResourceNames())
        {
            var match = ResourceName().Match(resource);
            if (!match.Success)
            {
                continue;
            }
            using var stream = assembly.GetManifestResourceStream(resource)!;
            using var reader = new StreamReader(stream);
            migrations.Add(new Migration(
                int.Parse(match.Groups["version"].Value, CultureInfo.InvariantCulture),
                match.Groups["name"].Value,
                reader.ReadToEnd()));
        }
        migrations.Sort((a, b) => a.Version.CompareTo(b.Version));
        for (var i = 0; i < migrations.Count; i++)
        {
            if (migrations[i].Version != i + 1)
            {
                throw new InvalidOperationException($"Migration numbers must run 1, 2, 3 ... without gaps; found {migrations[i].Version} at position {i + 1}.");
            }
        }
        return [.. migrations];
    }

    [GeneratedRegex(@"\.Migrations\.(?<version>\d{4})_(?<name>[a-z0-9_]+)\.sql$")]
    private static partial Regex ResourceName();
}
