using ForecastHub.Storage.Postgres;
using ForecastHub.Storage.Postgres.Migrations;
using Npgsql;

namespace ForecastHub.Storage.Tests.Postgres;

/// <summary>Which errors of the real server count as storage trouble (SQLSTATE codes from the PostgreSQL 15
/// manual, appendix A), and how readiness follows them: full until a write succeeds, damaged until a restart.</summary>
public sealed class PostgresStorageHealthTests
{
    [Theory]
    [InlineData("disk_full", "53100", true, false)]
    [InlineData("out_of_memory", "53200", true, false)]
    [InlineData("data_corrupted", "XX001", false, true)]
    [InlineData("index_corrupted", "XX002", false, true)]
    [InlineData("unique_violation", "23505", false, false)]
    public async Task TheServersErrorIsClassifiedAndReadinessFollowsIt(string condition, string sqlState, bool full, bool damaged)
    {
        await using var db = await PostgresTestDatabase.CreateAsync();
        var schema = new PostgresStorageSchema(db.Database, new PostgresMigrationRunner(db.Database));

        var error = await Assert.ThrowsAsync<PostgresException>(() => db.Database.WriteAsync(async (connection, transaction) =>
        {
            await using var raise = new NpgsqlCommand($"DO $$ BEGIN RAISE EXCEPTION 'raised by the test' USING ERRCODE = '{condition}'; END $$;", connection, transaction);
            return await raise.ExecuteNonQueryAsync();
        }));

        Assert.Equal(sqlState, error.SqlState);
        Assert.Equal((full, damaged), (PostgresErrors.IsFull(error), PostgresErrors.IsDamage(error)));
        Assert.Equal((full, damaged), (db.Database.Health.IsFull, db.Database.Health.Damage is not null));
        var readiness = await schema.CheckReadinessAsync();
        Assert.Equal(!(full || damaged), readiness.Ready);

        // A write that succeeds ends "full"; damage stays.
        await db.Database.WriteAsync(async (connection, transaction) =>
        {
            await using var select = new NpgsqlCommand("SELECT 1;", connection, transaction);
            return await select.ExecuteScalarAsync();
        });
        Assert.Equal(!damaged, (await schema.CheckReadinessAsync()).Ready);
    }
}
