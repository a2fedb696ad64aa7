using ForecastHub.Api.Auth;
using Microsoft.AspNetCore.Hosting.Server;
using Microsoft.AspNetCore.Hosting.Server.Features;
using Microsoft.Extensions.Configuration.Json;
using Microsoft.Extensions.Configuration.Memory;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Demo;

/// <summary>Configuration section <c>Demo</c>.</summary>
public sealed class DemoOptions
{
    public const string SectionName = "Demo";

    /// <summary>Load the demo scenario at start (also switched on by the <c>--demo</c> flag).</summary>
    public bool Enabled { get; set; }

    /// <summary>Seed of the generator: the same seed and clock give the same data.</summary>
    public int Seed { get; set; } = DemoScenario.DefaultSeed;
}

/// <summary>
/// <c>--demo</c>: reads open to anyone, its own SQLite file (<c>data/demo.db</c>) unless one is named,
/// a generated admin key for writes when none is configured, and the demo sites loaded fresh
/// before the server starts listening.
/// </summary>
public static class DemoMode
{
    public const string Flag = "--demo";
    public const string DefaultStoragePath = "data/demo.db";

    /// <summary>The arguments without <c>--demo</c> (which the configuration binder would read as a key
    /// swallowing the next argument), and whether it was there.</summary>
    public static string[] WithoutFlag(string[] args, out bool present)
    {
        ArgumentNullException.ThrowIfNull(args);
        present = args.Any(IsFlag);
        return [.. args.Where(a => !IsFlag(a))];
    }

    /// <summary>Call after the storage is registered, so the migrations run before the demo loads.</summary>
    public static WebApplicationBuilder AddDemoMode(this WebApplicationBuilder builder, bool flag)
    {
        ArgumentNullException.ThrowIfNull(builder);
        var configuration = builder.Configuration;
        if (!flag && !configuration.GetValue<bool>($"{DemoOptions.SectionName}:{nameof(DemoOptions.Enabled)}"))
        {
            return builder;
        }

        var defaults = new Dictionary<string, string?>
        {
            [$"{DemoOptions.SectionName}:{nameof(DemoOptions.Enabled)}"] = "true",
            ["Storage:Path"] = DefaultStoragePath,
        };
        string? generatedKey = null;
        if (string.IsNullOrEmpty(configuration["Auth:AdminKey"]))
        {
            generatedKey = ApiKeySecrets.NewSecret();
            defaults["Auth:AdminKey"] = generatedKey;
        }
        // Above appsettings.json, below environment variables and the command line, so both still win.
        var afterJson = configuration.Sources.ToList().FindLastIndex(s => s is JsonConfigurationSource) + 1;
        configuration.Sources.Insert(afterJson, new MemoryConfigurationSource { InitialData = defaults });
        // The demo is for looking around: reads are open whatever else is configured.
        configuration.AddInMemoryCollection(new Dictionary<string, string?> { ["Auth:AllowAnonymousRead"] = "true" });

        builder.Services.AddOptions<DemoOptions>().BindConfiguration(DemoOptions.SectionName);
        builder.Services.AddSingleton<DemoLoader>();
        builder.Services.AddHostedService(sp => new DemoStartup(
            sp.GetRequiredService<DemoLoader>(),
            sp.GetRequiredService<IOptions<DemoOptions>>(),
            sp.GetRequiredService<IServer>(),
            sp.GetRequiredService<ILogger<DemoStartup>>(),
            generatedKey));
        return builder;
    }

    private static bool IsFlag(string arg) =>
        string.Equals(arg, Flag, StringComparison.OrdinalIgnoreCase) || string.Equals(arg, "/demo", StringComparison.OrdinalIgnoreCase);
}

/// <summary>Loads the demo in the host's starting phase and tells the person at the console where to look.</summary>
internal sealed class DemoStartup(
    DemoLoader loader, IOptions<DemoOptions> options, IServer server, ILogger<DemoStartup> logger, string? generatedKey)
    : IHostedLifecycleService
{
    private DemoLoadResult? loaded;

    public async Task StartingAsync(CancellationToken cancellationToken)
    {
        loaded = await loader.LoadAsync(options.Value.Seed, cancellationToken).ConfigureAwait(false);
        if (logger.IsEnabled(LogLevel.Information))
        {
            logger.LogInformation("Demo scenario loaded: {Sites} sites, {Readings} readings in {ElapsedMs} ms",
                loaded.Sites, loaded.Readings, (long)loaded.Elapsed.TotalMilliseconds);
        }
    }

    public Task StartedAsync(CancellationToken cancellationToken)
    {
        var addresses = server.Features.Get<IServerAddressesFeature>()?.Addresses ?? [];
        var console = Console.Out;
        console.WriteLine();
        console.WriteLine($"ForecastHub demo: {DemoScenario.FarmName}, {loaded?.Sites} sites, {loaded?.Readings:N0} readings loaded in {loaded?.Elapsed.TotalSeconds:F1} s.");
        foreach (var address in addresses)
        {
            console.WriteLine($"  Dashboard:  {address}/");
        }
        console.WriteLine("  Reads need no key in demo mode.");
        // Printed once, to the console only (never to the log), as the first start of any install does.
        console.WriteLine(generatedKey is null
            ? "  Writes need the admin key from your configuration (Auth:AdminKey)."
            : $"  Writes need this admin key:  Authorization: Bearer {generatedKey}");
        console.WriteLine();
        return Task.CompletedTask;
    }

    public Task StartAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StopAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StoppingAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StoppedAsync(CancellationToken cancellationToken) => Task.CompletedTask;
}
