using System.Security.Cryptography;
using System.Text;
using ForecastHub.Storage.Keys;

namespace ForecastHub.Storage.Contract;

/// <summary>What every <see cref="IApiKeyStore"/> must do: keys found by digest, revocation kept.</summary>
public abstract class ApiKeyStoreContract : StorageContract
{
    private static ApiKeyRecord Key(string id, string scope = "admin", params string[] siteIds) =>
        new(id, SHA256.HashData(Encoding.UTF8.GetBytes("secret-of-" + id)), scope, siteIds, "label " + id, Start, null);

    private static void AssertSame(ApiKeyRecord expected, ApiKeyRecord? actual)
    {
        Assert.NotNull(actual);
        Assert.Equal((expected.Id, expected.Scope, expected.Label, expected.CreatedAt, expected.RevokedAt),
            (actual.Id, actual.Scope, actual.Label, actual.CreatedAt, actual.RevokedAt));
        Assert.Equal(expected.SecretSha256, actual.SecretSha256);
        Assert.Equal(expected.SiteIds, actual.SiteIds);
    }

    [Fact]
    public async Task AKeyIsFoundByIdAndByTheDigestOfItsSecret()
    {
        var key = Key("key-0000000000000001", "ingest", "site-a", "site-b");

        Assert.True(await Backend.Keys.CreateAsync(key));

        AssertSame(key, await Backend.Keys.GetAsync(key.Id));
        AssertSame(key, await Backend.Keys.FindBySecretAsync(key.SecretSha256));
        Assert.Null(await Backend.Keys.FindBySecretAsync(SHA256.HashData("unknown"u8)));
        Assert.Null(await Backend.Keys.GetAsync("key-ffffffffffffffff"));
    }

    [Fact]
    public async Task ATakenIdOrDigestIsRefused()
    {
        var key = Key("key-0000000000000001");
        await Backend.Keys.CreateAsync(key);

        Assert.False(await Backend.Keys.CreateAsync(Key("key-0000000000000001", "read")));
        Assert.False(await Backend.Keys.CreateAsync(key with { Id = "key-0000000000000002" }));
        Assert.Single(await Backend.Keys.ListAsync(null, 10));
    }

    [Fact]
    public async Task KeysAreListedByIdInPages()
    {
        foreach (var id in new[] { "key-03", "key-01", "key-02" })
        {
            await Backend.Keys.CreateAsync(Key(id, "read"));
        }

        var first = await Backend.Keys.ListAsync(null, 2);
        Assert.Equal(["key-01", "key-02"], first.Select(k => k.Id));
        Assert.Equal(["key-03"], (await Backend.Keys.ListAsync(first[^1].Id, 2)).Select(k => k.Id));
    }

    [Fact]
    public async Task RevocationKeepsTheKeyWithItsFirstRevocationTime()
    {
        var admin = Key("key-0000000000000001");
        await Backend.Keys.CreateAsync(admin);
        await Backend.Keys.CreateAsync(Key("key-0000000000000002", "read"));
        Assert.True(await Backend.Keys.HasActiveAdminAsync());
        Assert.False(await Backend.Keys.HasActiveAdminAsync(exceptId: admin.Id));

        var revoked = await Backend.Keys.RevokeAsync(admin.Id, Start.AddHours(1));
        var again = await Backend.Keys.RevokeAsync(admin.Id, Start.AddHours(2));

        Assert.Equal((Start.AddHours(1), true), (revoked!.Key.RevokedAt, revoked.Revoked));
        Assert.Equal((Start.AddHours(1), false), (again!.Key.RevokedAt, again.Revoked));
        Assert.False((await Backend.Keys.FindBySecretAsync(admin.SecretSha256))!.IsActive);
        Assert.False(await Backend.Keys.HasActiveAdminAsync());
        Assert.Null(await Backend.Keys.RevokeAsync("key-ffffffffffffffff", Start));
    }

    [Fact]
    public async Task AFirstAdminKeyIsStoredOnlyWhileNoActiveAdminExists()
    {
        Assert.True(await Backend.Keys.CreateAsync(Key("key-0000000000000001", "read")));

        Assert.True(await Backend.Keys.CreateFirstAdminAsync(Key("key-0000000000000002")));
        Assert.False(await Backend.Keys.CreateFirstAdminAsync(Key("key-0000000000000003")));
        Assert.Null(await Backend.Keys.GetAsync("key-0000000000000003"));

        // Once every admin key is revoked, a start may generate one again.
        await Backend.Keys.RevokeAsync("key-0000000000000002", Start.AddHours(1));
        Assert.True(await Backend.Keys.CreateFirstAdminAsync(Key("key-0000000000000004")));
        Assert.Equal(["key-0000000000000001", "key-0000000000000002", "key-0000000000000004"],
            (await Backend.Keys.ListAsync(null, 10)).Select(k => k.Id));
    }
    [Fact]
    public async Task TheLastActiveAdminKeyIsKeptWhenAskedAndOthersAreRevoked()
    {
        await Backend.Keys.CreateAsync(Key("key-0000000000000001"));
        await Backend.Keys.CreateAsync(Key("key-0000000000000002"));
        await Backend.Keys.CreateAsync(Key("key-0000000000000003", "read"));

        Assert.Equal(KeyRevocationOutcome.Revoked, (await Backend.Keys.RevokeAsync("key-0000000000000001", Start, keepAnActiveAdmin: true))!.Outcome);
        var last = await Backend.Keys.RevokeAsync("key-0000000000000002", Start, keepAnActiveAdmin: true);
        Assert.Equal((KeyRevocationOutcome.LastActiveAdmin, null), (last!.Outcome, last.Key.RevokedAt));
        Assert.True(await Backend.Keys.HasActiveAdminAsync());
        Assert.Equal(KeyRevocationOutcome.Revoked, (await Backend.Keys.RevokeAsync("key-0000000000000003", Start, keepAnActiveAdmin: true))!.Outcome);
        Assert.Equal(KeyRevocationOutcome.AlreadyRevoked, (await Backend.Keys.RevokeAsync("key-0000000000000001", Start, keepAnActiveAdmin: true))!.Outcome);
        Assert.Null(await Backend.Keys.RevokeAsync("key-ffffffffffffffff", Start, keepAnActiveAdmin: true));
    }

    [Fact]
    public async Task TwoAdminKeysRevokedAtOnceWhileKeepingAnAdminLeaveOneActive()
    {
        // Each round: the last two admin keys are revoked at the same moment (as through two nodes); exactly one goes.
        for (var round = 0; round < 20; round++)
        {
            var ids = new[] { $"key-{round:x8}0000000a", $"key-{round:x8}0000000b" };
            foreach (var id in ids)
            {
                await Backend.Keys.CreateAsync(Key(id));
            }

            var outcomes = await Task.WhenAll(ids.Select(id => Task.Run(() => Backend.Keys.RevokeAsync(id, Start, keepAnActiveAdmin: true))));

            Assert.Equal([KeyRevocationOutcome.Revoked, KeyRevocationOutcome.LastActiveAdmin], outcomes.Select(o => o!.Outcome).Order());
            var kept = outcomes.Single(o => o!.Outcome == KeyRevocationOutcome.LastActiveAdmin)!.Key.Id;
            Assert.True((await Backend.Keys.GetAsync(kept))!.IsActive);
            Assert.False(await Backend.Keys.HasActiveAdminAsync(exceptId: kept));
            // Without the request to keep one, the last admin key can be revoked (a configured key remains).
            Assert.True((await Backend.Keys.RevokeAsync(kept, Start))!.Revoked);
        }
    }
}
