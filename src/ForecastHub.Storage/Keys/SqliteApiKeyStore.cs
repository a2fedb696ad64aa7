using System.Text.Json;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage.Keys;

public sealed class SqliteApiKeyStore(SqliteDatabase database) : IApiKeyStore
{
    private const string Columns = "id, secret_sha256, scope, site_ids, label, created_at_ms, revoked_at_ms";

    public Task<bool> CreateAsync(ApiKeyRecord key, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(key);
        return database.WriteAsync((connection, transaction) => Insert(connection, transaction, key), cancellationToken);
    }

    // The write transaction holds SQLite's one write lock, so the check and the insert are one step for every process on the file.
    public Task<bool> CreateFirstAdminAsync(ApiKeyRecord key, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(key);
        return database.WriteAsync((connection, transaction) =>
        {
            using var exists = connection.Command(transaction, "SELECT EXISTS (SELECT 1 FROM api_keys WHERE scope = 'admin' AND revoked_at_ms IS NULL);");
            return Convert.ToInt64(exists.ExecuteScalar(), System.Globalization.CultureInfo.InvariantCulture) == 0 && Insert(connection, transaction, key);
        }, cancellationToken);
    }

    private static bool Insert(SqliteConnection connection, SqliteTransaction transaction, ApiKeyRecord key)
    {
        using var insert = connection.Command(transaction, $"""
                INSERT INTO api_keys ({Columns}) VALUES ($id, $hash, $scope, $sites, $label, $created, $revoked)
                ON CONFLICT DO NOTHING;
                """)
            .With("$id", key.Id)
            .With("$hash", key.SecretSha256)
            .With("$scope", key.Scope)
            .With("$sites", JsonSerializer.Serialize(key.SiteIds))
            .With("$label", key.Label)
            .With("$created", key.CreatedAt.ToUnixTimeMilliseconds())
            .With("$revoked", key.RevokedAt?.ToUnixTimeMilliseconds());
        return insert.ExecuteNonQuery() == 1;
    }

    public Task<ApiKeyRecord?> FindBySecretAsync(byte[] secretSha256, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read((connection, transaction) => SelectOne(connection, transaction, "secret_sha256", secretSha256)));

    public Task<ApiKeyRecord?> GetAsync(string id, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read((connection, transaction) => SelectOne(connection, transaction, "id", id)));

    public Task<IReadOnlyList<ApiKeyRecord>> ListAsync(string? afterId, int limit, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read<IReadOnlyList<ApiKeyRecord>>((connection, transaction) =>
        {
            using var select = connection.Command(transaction, $"SELECT {Columns} FROM api_keys WHERE id > $after ORDER BY id LIMIT $limit;")
                .With("$after", afterId ?? "")
                .With("$limit", limit);
            using var reader = select.ExecuteReader();
            var keys = new List<ApiKeyRecord>();
            while (reader.Read())
            {
                keys.Add(ReadKey(reader));
            }
            return keys;
        }));

    public Task<KeyRevocation?> RevokeAsync(string id, DateTimeOffset at, bool keepAnActiveAdmin = false, CancellationToken cancellationToken = default) =>
        database.WriteAsync((connection, transaction) =>
        {
            // One writer at a time: the check below and the update see the same keys.
            if (SelectOne(connection, transaction, "id", id) is not { } before)
            {
                return null;
            }
            if (before.RevokedAt is not null)
            {
                return new KeyRevocation(before, KeyRevocationOutcome.AlreadyRevoked);
            }
            if (keepAnActiveAdmin && before.Scope == "admin" && !OtherActiveAdmin(connection, transaction, id))
            {
                return new KeyRevocation(before, KeyRevocationOutcome.LastActiveAdmin);
            }
            using (var revoke = connection.Command(transaction, "UPDATE api_keys SET revoked_at_ms = $at WHERE id = $id AND revoked_at_ms IS NULL;")
                       .With("$id", id)
                       .With("$at", at.ToUnixTimeMilliseconds()))
            {
                revoke.ExecuteNonQuery();
            }
            return new KeyRevocation(SelectOne(connection, transaction, "id", id)!, KeyRevocationOutcome.Revoked);
        }, cancellationToken);

    public Task<bool> HasActiveAdminAsync(string? exceptId = null, CancellationToken cancellationToken = default) =>
        Task.FromResult(database.Read((connection, transaction) => OtherActiveAdmin(connection, transaction, exceptId)));

    private static bool OtherActiveAdmin(SqliteConnection connection, SqliteTransaction transaction, string? exceptId)
    {
        using var exists = connection.Command(transaction,
            "SELECT EXISTS (SELECT 1 FROM api_keys WHERE scope = 'admin' AND revoked_at_ms IS NULL AND id <> $except);")
            .With("$except", exceptId ?? "");
        return Convert.ToInt64(exists.ExecuteScalar(), System.Globalization.CultureInfo.InvariantCulture) == 1;
    }

    private static ApiKeyRecord? SelectOne(SqliteConnection connection, SqliteTransaction transaction, string column, object value)
    {
        // The column name comes from this class only, never from input.
        using var select = connection.Command(transaction, $"SELECT {Columns} FROM api_keys WHERE {column} = $value;")
            .With("$value", value);
        using var reader = select.ExecuteReader();
        return reader.Read() ? ReadKey(reader) : null;
    }

    private static ApiKeyRecord ReadKey(SqliteDataReader reader) => new(
        reader.GetString(0),
        (byte[])reader.GetValue(1),
        reader.GetString(2),
        JsonSerializer.Deserialize<string[]>(reader.GetString(3)) ?? [],
        reader.GetNullableString(4),
        SqliteExtensions.FromUnixMs(reader.GetInt64(5)),
        reader.IsDBNull(6) ? null : SqliteExtensions.FromUnixMs(reader.GetInt64(6)));
}
