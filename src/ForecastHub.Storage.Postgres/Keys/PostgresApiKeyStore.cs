using System.Text.Json;
using ForecastHub.Storage.Keys;
using ForecastHub.Storage.Postgres.Cluster;
using Npgsql;

namespace ForecastHub.Storage.Postgres.Keys;

public sealed class PostgresApiKeyStore(PostgresDatabase database) : IApiKeyStore
{
    // Any fixed 64-bit number shared by every node; it names the lock on the set of admin keys (the first one, the last one); the migration lock uses another.
    private const long AdminKeysLockId = 0x466F_7265_4875_6202;

    private const string Columns = "id, secret_sha256, scope, site_ids, label, created_at_ms, revoked_at_ms";

    public Task<bool> CreateAsync(ApiKeyRecord key, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(key);
        return database.WriteAsync((connection, transaction) => InsertAsync(connection, transaction, key, cancellationToken), cancellationToken);
    }

    public Task<bool> CreateFirstAdminAsync(ApiKeyRecord key, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(key);
        return database.WriteAsync(async (connection, transaction) =>
        {
            // Nodes starting together queue on this lock until the first commits; the next then sees its key.
            await using (var take = connection.Command(transaction, "SELECT pg_advisory_xact_lock($1);").With(AdminKeysLockId))
            {
                await take.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
            }

            await using (var exists = connection.Command(transaction, "SELECT EXISTS (SELECT 1 FROM api_keys WHERE scope = 'admin' AND revoked_at_ms IS NULL);"))
            {
                if ((bool)(await exists.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false))!)
                {
                    return false;
                }
            }

            return await InsertAsync(connection, transaction, key, cancellationToken).ConfigureAwait(false);
        }, cancellationToken);
    }

    private static async Task<bool> InsertAsync(NpgsqlConnection connection, NpgsqlTransaction transaction, ApiKeyRecord key, CancellationToken cancellationToken)
    {
        await using var insert = connection.Command(transaction, $"""
                INSERT INTO api_keys ({Columns}) VALUES ($1, $2, $3, $4, $5, $6, $7) ON CONFLICT DO NOTHING;
                """)
            .With(key.Id)
            .With(key.SecretSha256)
            .With(key.Scope)
            .With(JsonSerializer.Serialize(key.SiteIds))
            .With(key.Label, NpgsqlTypes.NpgsqlDbType.Text)
            .With(key.CreatedAt.ToUnixTimeMilliseconds())
            .With(key.RevokedAt?.ToUnixTimeMilliseconds(), NpgsqlTypes.NpgsqlDbType.Bigint);
        var created = await insert.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false) == 1;
        if (created)
        {
            await new ChangeNotice(ChangeKind.Key, key.Id).SendAsync(connection, transaction, cancellationToken).ConfigureAwait(false);
        }
        return created;
    }

    public Task<ApiKeyRecord?> FindBySecretAsync(byte[] secretSha256, CancellationToken cancellationToken = default) =>
        database.QueryAsync(connection => SelectOneAsync(connection, null, "secret_sha256", secretSha256, cancellationToken), cancellationToken);

    public Task<ApiKeyRecord?> GetAsync(string id, CancellationToken cancellationToken = default) =>
        database.QueryAsync(connection => SelectOneAsync(connection, null, "id", id, cancellationToken), cancellationToken);

    public Task<IReadOnlyList<ApiKeyRecord>> ListAsync(string? afterId, int limit, CancellationToken cancellationToken = default) =>
        database.QueryAsync<IReadOnlyList<ApiKeyRecord>>(async connection =>
        {
            await using var select = connection.Command(null, $"SELECT {Columns} FROM api_keys WHERE id > $1 ORDER BY id LIMIT $2;")
                .With(afterId ?? "").With(limit);
            await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
            var keys = new List<ApiKeyRecord>();
            while (await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
            {
                keys.Add(ReadKey(reader));
            }
            return keys;
        }, cancellationToken);

    public Task<KeyRevocation?> RevokeAsync(string id, DateTimeOffset at, bool keepAnActiveAdmin = false, CancellationToken cancellationToken = default) =>
        database.WriteAsync<KeyRevocation?>(async (connection, transaction) =>
        {
            if (keepAnActiveAdmin)
            {
                // Two nodes each revoking one of the last two admin keys queue here, so the second sees the first's revocation.
                await using var take = connection.Command(transaction, "SELECT pg_advisory_xact_lock($1);").With(AdminKeysLockId);
                await take.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
            }
            if (await SelectOneAsync(connection, transaction, "id", id, cancellationToken).ConfigureAwait(false) is not { } before)
            {
                return null;
            }
            if (before.RevokedAt is not null)
            {
                return new KeyRevocation(before, KeyRevocationOutcome.AlreadyRevoked);
            }
            if (keepAnActiveAdmin && before.Scope == "admin" && !await OtherActiveAdminAsync(connection, transaction, id, cancellationToken).ConfigureAwait(false))
            {
                return new KeyRevocation(before, KeyRevocationOutcome.LastActiveAdmin);
            }
            await using (var revoke = connection.Command(transaction, "UPDATE api_keys SET revoked_at_ms = $2 WHERE id = $1 AND revoked_at_ms IS NULL;")
                       .With(id).With(at.ToUnixTimeMilliseconds()))
            {
                if (await revoke.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false) != 1)
                {
                    // Revoked by another node between the read and the update.
                    return new KeyRevocation((await SelectOneAsync(connection, transaction, "id", id, cancellationToken).ConfigureAwait(false))!, KeyRevocationOutcome.AlreadyRevoked);
                }
            }
            await new ChangeNotice(ChangeKind.Key, id).SendAsync(connection, transaction, cancellationToken).ConfigureAwait(false);
            return new KeyRevocation((await SelectOneAsync(connection, transaction, "id", id, cancellationToken).ConfigureAwait(false))!, KeyRevocationOutcome.Revoked);
        }, cancellationToken);

    public Task<bool> HasActiveAdminAsync(string? exceptId = null, CancellationToken cancellationToken = default) =>
        database.QueryAsync(connection => OtherActiveAdminAsync(connection, null, exceptId, cancellationToken), cancellationToken);

    private static async Task<bool> OtherActiveAdminAsync(NpgsqlConnection connection, NpgsqlTransaction? transaction, string? exceptId, CancellationToken cancellationToken)
    {
        await using var exists = connection.Command(transaction,
            "SELECT EXISTS (SELECT 1 FROM api_keys WHERE scope = 'admin' AND revoked_at_ms IS NULL AND id <> $1);").With(exceptId ?? "");
        return (bool)(await exists.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false))!;
    }

    private static async Task<ApiKeyRecord?> SelectOneAsync(NpgsqlConnection connection, NpgsqlTransaction? transaction, string column, object value,
        CancellationToken cancellationToken)
    {
        // The column name comes from this class only, never from input.
        await using var select = connection.Command(transaction, $"SELECT {Columns} FROM api_keys WHERE {column} = $1;").With(value);
        await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
        return await reader.ReadAsync(cancellationToken).ConfigureAwait(false) ? ReadKey(reader) : null;
    }

    private static ApiKeyRecord ReadKey(NpgsqlDataReader reader) => new(
        reader.GetString(0),
        (byte[])reader.GetValue(1),
        reader.GetString(2),
        JsonSerializer.Deserialize<string[]>(reader.GetString(3)) ?? [],
        reader.GetNullableString(4),
        NpgsqlExtensions.FromUnixMs(reader.GetInt64(5)),
        reader.IsDBNull(6) ? null : NpgsqlExtensions.FromUnixMs(reader.GetInt64(6)));
}
