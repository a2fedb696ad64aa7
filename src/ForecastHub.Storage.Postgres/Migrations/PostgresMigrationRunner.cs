using System.Globalization;
using System.Text.RegularExpressions;
using Npgsql;

namespace ForecastHub.Storage.Postgres.Migrations;

/// <summary>
/// Brings the database to the newest schema of this build. Several nodes may start at once: each
/// runs under one transaction-level advisory lock, so one applies the missing migrations and the
/// others then find nothing left to do.
/// </summary>
public sealed partial class PostgresMigrationRunner(PostgresDatabase database)
{
    // Any fixed 64-bit number shared by every node; it names the migration lock.
    private const long MigrationLockId = 0x466F_7265_4875_6201;

    /// <summary>Every migration shipped with this build, ordered by version (embedded <c>Migrations/NNNN_name.sql</c>).</summary>
    public static IReadOnlyList<(int Version, string Name, string Sql)> All { get; } = LoadEmbedded();

    /// <summary>The newest version this build knows.</summary>
    public int LatestVersion => All[^1].Version;

    /// <summary>Applies migrations up to <paramref name="targetVersion"/> (default: all) and answers the resulting version.</summary>
    public async Task<int> ApplyAsync(int? targetVersion = null, CancellationToken cancellationToken = default)
    {
        var target = targetVersion ?? LatestVersion;
        return await database.WriteAsync(async (connection, transaction) =>
        {
            await using (var lockCommand = connection.Command(transaction, "SELECT pg_advisory_xact_lock($1);").With(MigrationLockId))
            {
                await lockCommand.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
            }
            await using (var history = connection.Command(transaction, """
                CREATE TABLE IF NOT EXISTS schema_migrations (
                    version       integer PRIMARY KEY,
                    name          text    NOT NULL,
                    applied_at_ms bigint  NOT NULL
                );
                """))
            {
                await history.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
            }
            var current = await CurrentVersionAsync(connection, transaction, cancellationToken).ConfigureAwait(false);
            foreach (var (version, name, sql) in All.Where(m => m.Version > current && m.Version <= target))
            {
                await using (var apply = connection.Command(transaction, sql))
                {
                    await apply.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
                }
                await using var record = connection.Command(transaction,
                        "INSERT INTO schema_migrations (version, name, applied_at_ms) VALUES ($1, $2, $3);")
                    .With(version).With(name).With(DateTimeOffset.UtcNow.ToUnixTimeMilliseconds());
                await record.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
                current = version;
            }
            return current;
        }, cancellationToken).ConfigureAwait(false);
    }

    /// <summary>The schema version of the database (0 when nothing was applied yet).</summary>
    public Task<int> CurrentVersionAsync(CancellationToken cancellationToken = default) =>
        database.QueryAsync(connection => CurrentVersionAsync(connection, null, cancellationToken), cancellationToken);

    private static async Task<int> CurrentVersionAsync(NpgsqlConnection connection, NpgsqlTransaction? transaction, CancellationToken cancellationToken)
    {
        await using (var exists = connection.Command(transaction, "SELECT to_regclass('schema_migrations') IS NOT NULL;"))
        {
            if (!(bool)(await exists.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false))!)
            {
                return 0;
            }
        }
        await using var version = connection.Command(transaction, "SELECT coalesce(max(version), 0) FROM schema_migrations;");
        return Convert.ToInt32(await version.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false), CultureInfo.InvariantCulture);
    }

    private static (int Version, string Name, string Sql)[] LoadEmbedded()
    {
        var assembly = typeof(PostgresMigrationRunner).Assembly;
        var migrations = new List<(int, string, string)>();
        foreach (var resource in assembly.GetManifestResourceNames())
        {
            var match = ResourceName().Match(resource);
            if (!match.Success)
            {
                continue;
            }
            using var stream = assembly.GetManifestResourceStream(resource)!;
            using var reader = new StreamReader(stream);
            migrations.Add((int.Parse(match.Groups["version"].Value, CultureInfo.InvariantCulture), match.Groups["name"].Value, reader.ReadToEnd()));
        }
        migrations.Sort((a, b) => a.Item1.CompareTo(b.Item1));
        for (var i = 0; i < migrations.Count; i++)
        {
            if (migrations[i].Item1 != i + 1)
            {
                throw new InvalidOperationException($"PostgreSQL migration numbers must run 1, 2, 3 ... without gaps; found {migrations[i].Item1} at position {i + 1}.");
            }
        }
        return [.. migrations];
    }

    [GeneratedRegex(@"\.Migrations\.(?<version>\d{4})_(?<name>[a-z0-9_]+)\.sql$")]
    private static partial Regex ResourceName();
}
