using System.Net.Http.Headers;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.TestHost;
using Microsoft.AspNetCore.Mvc.Testing;
using Microsoft.Data.Sqlite;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Time.Testing;

namespace ForecastHub.Api.Tests.Infrastructure;

/// <summary>The real pipeline on its own SQLite file, with a fake clock and a known admin key.</summary>
public sealed class ApiFactory : WebApplicationFactory<Program>
{
    public const string AdminKey = "test-admin-key-7f3a9c-0123456789abcdef";

    public static readonly DateTimeOffset Now = new(2025, 6, 1, 12, 0, 0, TimeSpan.Zero);

    public string DatabasePath { get; init; } = TestFiles.NewDatabasePath();

    /// <summary>Leaves the database file in place on dispose, for a test that restarts on it.</summary>
    public bool KeepDatabase { get; init; }

    public FakeTimeProvider Clock { get; } = new(Now);

    public bool AllowAnonymousRead { get; init; }

    /// <summary>Extra configuration, applied after the defaults above (a null value clears a key).</summary>
    public IReadOnlyDictionary<string, string?> Settings { get; init; } = new Dictionary<string, string?>();

    /// <summary>Service replacements applied after the app's own registrations.</summary>
    public Action<IServiceCollection>? TestServices { get; init; }

    protected override void ConfigureWebHost(IWebHostBuilder builder)
    {
        builder.UseSetting("Storage:Path", DatabasePath);
        builder.UseSetting("Auth:AdminKey", AdminKey);
        builder.UseSetting("Auth:AllowAnonymousRead", AllowAnonymousRead ? "true" : "false");
        builder.UseSetting("Serilog:MinimumLevel:Default", "Warning");
        // An in-memory source rather than UseSetting: nested keys (Serilog:WriteTo:0:Name) keep null parents.
        builder.ConfigureAppConfiguration(config => config.AddInMemoryCollection(Settings));
        builder.ConfigureServices(services => services.AddSingleton<TimeProvider>(Clock));
        if (TestServices is not null)
        {
            builder.ConfigureTestServices(TestServices);
        }
    }

    /// <summary>A client that sends the admin key.</summary>
    public HttpClient CreateAdminClient()
    {
        var client = CreateClient();
        client.DefaultRequestHeaders.Authorization = new AuthenticationHeaderValue("Bearer", AdminKey);
        return client;
    }

    public override async ValueTask DisposeAsync()
    {
        await base.DisposeAsync();
        if (!KeepDatabase)
        {
            TestFiles.DeleteDatabase(DatabasePath);
        }
    }
}

public static class TestFiles
{
    public static string NewDatabasePath()
    {
        var folder = Path.Combine(Path.GetTempPath(), "forecasthub-tests");
        Directory.CreateDirectory(folder);
        return Path.Combine(folder, $"{Guid.NewGuid():N}.db");
    }

    /// <summary>Pooled connections keep the file open, so pools are cleared first.</summary>
    public static void DeleteDatabase(string path)
    {
        SqliteConnection.ClearAllPools();
        foreach (var file in new[] { path, path + "-wal", path + "-shm" })
        {
            File.Delete(file);
        }
    }
}
