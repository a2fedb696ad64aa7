using Npgsql;

namespace ForecastHub.Storage.Postgres.Cluster;

/// <summary>What changed, as every node hears it on <see cref="PostgresDatabase.ChangeChannel"/>.</summary>
public enum ChangeKind
{
    /// <summary>A site was created, changed or deleted (site caches, and its model when deleted).</summary>
    Site,

    /// <summary>New or replaced readings of a site (cached answers built on its data).</summary>
    Data,

    /// <summary>A site's model, fit attempt or scores changed (loaded models and cached answers).</summary>
    Model,

    /// <summary>An API key was created or revoked (key caches).</summary>
    Key,
}

/// <summary>
/// A change made by one node that the others must honour, sent with <c>pg_notify</c> inside the
/// transaction that made it: PostgreSQL delivers it to every listening session when (and only when)
/// that transaction commits. The payload is "kind:id".
/// </summary>
public readonly record struct ChangeNotice(ChangeKind Kind, string Id)
{
    public string Payload => $"{Kind.ToString().ToLowerInvariant()}:{Id}";

    public static ChangeNotice? Parse(string payload)
    {
        ArgumentNullException.ThrowIfNull(payload);
        var colon = payload.IndexOf(':', StringComparison.Ordinal);
        return colon > 0 && Enum.TryParse<ChangeKind>(payload[..colon], ignoreCase: true, out var kind)
            ? new ChangeNotice(kind, payload[(colon + 1)..])
            : null;
    }

    /// <summary>Queues the notice in the caller's transaction.</summary>
    public async Task SendAsync(NpgsqlConnection connection, NpgsqlTransaction transaction, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(connection);
        await using var notify = connection.Command(transaction, "SELECT pg_notify($1, $2);")
            .With(PostgresDatabase.ChangeChannel).With(Payload);
        await notify.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
    }
}
