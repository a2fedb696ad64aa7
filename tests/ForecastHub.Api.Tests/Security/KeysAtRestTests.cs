using System.Security.Cryptography;
using System.Text;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Keys;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Api.Tests.Security;

public sealed class KeysAtRestTests
{
    [Fact]
    public async Task NoKeyAppearsInClearInTheDatabaseFiles()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();
        using var client = factory.CreateClient();
        var keys = new[]
        {
            await admin.IssueKey("admin"),
            await admin.IssueKey("ingest", "orchard-1"),
            await admin.IssueKey("read"),
        };
        foreach (var key in keys)
        {
            using var used = await client.GetWith("/api/v1/sites", key.Secret);
        }
        await admin.Revoke(keys[2].Id);

        // Read while the service runs: the newest rows are still in the -wal file.
        var files = new[] { factory.DatabasePath, factory.DatabasePath + "-wal" }.Where(File.Exists).ToList();
        var bytes = files.Select(ReadShared).ToList();

        Assert.Contains(factory.DatabasePath + "-wal", files);
        foreach (var key in keys)
        {
            var random = key.Secret["fhk_".Length..];
            Assert.DoesNotContain(bytes, b => Contains(b, key.Secret) || Contains(b, random));
            // The scan does see the stored rows: each key's digest is there.
            Assert.Contains(bytes, b => b.AsSpan().IndexOf(SHA256.HashData(Encoding.UTF8.GetBytes(key.Secret))) >= 0);
        }
        Assert.DoesNotContain(bytes, b => Contains(b, ApiFactory.AdminKey));
    }

    [Fact]
    public async Task StoredRowsHoldOnlyTheDigestOfEachSecret()
    {
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();
        var key = await admin.IssueKey("read");

        using var connection = new SqliteConnection($"Data Source={factory.DatabasePath};Mode=ReadOnly;Pooling=False");
        connection.Open();
        using var select = connection.CreateCommand();
        select.CommandText = "SELECT * FROM api_keys WHERE id = $id;";
        select.Parameters.AddWithValue("$id", key.Id);
        using var reader = select.ExecuteReader();
        Assert.True(reader.Read());
        var values = Enumerable.Range(0, reader.FieldCount).Select(i => reader.IsDBNull(i) ? null : reader.GetValue(i)).ToList();

        Assert.Contains(values, v => v is byte[] digest && digest.SequenceEqual(SHA256.HashData(Encoding.UTF8.GetBytes(key.Secret))));
        Assert.DoesNotContain(values, v => v is string text && text.Contains(key.Secret["fhk_".Length..], StringComparison.Ordinal));
    }

    private static byte[] ReadShared(string path)
    {
        using var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete);
        using var copy = new MemoryStream();
        stream.CopyTo(copy);
        return copy.ToArray();
    }

    private static bool Contains(byte[] haystack, string text) =>
        haystack.AsSpan().IndexOf(Encoding.UTF8.GetBytes(text)) >= 0 || haystack.AsSpan().IndexOf(Encoding.Unicode.GetBytes(text)) >= 0;
}
