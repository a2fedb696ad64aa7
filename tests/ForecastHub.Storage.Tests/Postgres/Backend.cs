using ForecastHub.Storage.Alerts;
using ForecastHub.Storage.Cluster;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Keys;
using ForecastHub.Storage.Migrations;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Postgres;
using ForecastHub.Storage.Postgres.Alerts;
using ForecastHub.Storage.Postgres.Cluster;
using ForecastHub.Storage.Postgres.Health;
using ForecastHub.Storage.Postgres.Keys;
using ForecastHub.Storage.Postgres.Models;
using ForecastHub.Storage.Postgres.Readings;
using ForecastHub.Storage.Postgres.Sites;
using ForecastHub.Storage.Postgres.Verification;
using ForecastHub.Storage.Postgres.Webhooks;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Verification;
using ForecastHub.Storage.Webhooks;

namespace ForecastHub.Storage.Tests.Postgres;

/// <summary>Every store of one backend on a fresh, migrated database, so one test runs on both.</summary>
public sealed class Backend : IAsyncDisposable
{
    private readonly Func<ValueTask> dispose;

    private Backend(string name, ISiteStore sites, IReadingStore readings, IApiKeyStore keys, IModelStore models,
        IForecastArchive archive, IReadingSummaryStore summaries, IWorkLeases leases, IWebhookStore webhooks, IAlertStore alerts,
        PostgresDatabase? postgres, Func<ValueTask> dispose)
    {
        Name = name;
        Sites = sites;
        Readings = readings;
        Keys = keys;
        Models = models;
        Archive = archive;
        Summaries = summaries;
        Leases = leases;
        Webhooks = webhooks;
        Alerts = alerts;
        Postgres = postgres;
        this.dispose = dispose;
    }

    public static TheoryData<string> Names => new("sqlite", "postgres");

    public string Name { get; }

    public ISiteStore Sites { get; }

    public IReadingStore Readings { get; }

    public IApiKeyStore Keys { get; }

    public IModelStore Models { get; }

    public IForecastArchive Archive { get; }

    public IReadingSummaryStore Summaries { get; }

    public IWorkLeases Leases { get; }

    public IWebhookStore Webhooks { get; }

    public IAlertStore Alerts { get; }

    /// <summary>The PostgreSQL database, for tests that open a second store on it as another node would; null on SQLite.</summary>
    public PostgresDatabase? Postgres { get; }

    public static async Task<Backend> CreateAsync(string name, TimeProvider? clock = null)
    {
        clock ??= TimeProvider.System;
        if (name == "sqlite")
        {
            var file = new TestDatabase();
            await new MigrationRunner(file.Database).ApplyAsync();
            var db = file.Database;
            return new Backend(name, new SqliteSiteStore(db, clock), new SqliteReadingStore(db), new SqliteApiKeyStore(db),
                new SqliteModelStore(db), new SqliteForecastArchive(db), new SqliteReadingSummaryStore(db), new LocalWorkLeases(clock),
                new SqliteWebhookStore(db), new SqliteAlertStore(db), null,
                () =>
                {
                    file.Dispose();
                    return ValueTask.CompletedTask;
                });
        }

        var pg = await PostgresTestDatabase.CreateAsync();
        var database = pg.Database;
        return new Backend(name, new PostgresSiteStore(database, clock), new PostgresReadingStore(database), new PostgresApiKeyStore(database),
            new PostgresModelStore(database), new PostgresForecastArchive(database), new PostgresReadingSummaryStore(database),
            new PostgresWorkLeases(database), new PostgresWebhookStore(database), new PostgresAlertStore(database), database, pg.DisposeAsync);
    }

    public ValueTask DisposeAsync() => dispose();
}
