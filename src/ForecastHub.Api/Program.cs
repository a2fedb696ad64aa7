using ForecastHub.Api.Alerts;
using ForecastHub.Api.Http;
using ForecastHub.Api.Auth;
using ForecastHub.Api.CommandLine;
using ForecastHub.Api.Dashboard;
using ForecastHub.Api.Demo;
using ForecastHub.Api.Health;
using ForecastHub.Api.Hosting;
using ForecastHub.Api.Keys;
using ForecastHub.Api.Mqtt;
using ForecastHub.Api.Observations;
using ForecastHub.Api.OpenApi;
using ForecastHub.Api.Problems;
using ForecastHub.Api.Sites;
using ForecastHub.Api.Webhooks;

if (HealthProbe.IsRequested(args))
{
    return await HealthProbe.RunAsync(args, Console.Out);
}

if (CheckStorageVerb.IsRequested(args))
{
    return CheckStorageVerb.Run(args, Console.Out, Console.Error);
}

if (OfflineVerbs.IsRequested(args))
{
    return await OfflineVerbs.RunAsync(args, Console.Out, Console.Error, TimeProvider.System);
}

if (ImportVerb.IsRequested(args))
{
    return await ImportVerb.RunAsync(args, Console.Out, Console.Error);
}

if (ServerCommandLine.Intercept(args, Console.Out, Console.Error) is { } exitCode)
{
    return exitCode;
}

args = DemoMode.WithoutFlag(args, out var demoFlag);
var builder = WebApplication.CreateBuilder(args);

builder.AddForecastHubLogging();
builder.Services.AddForecastHubProblems();
builder.Services.AddForecastHubStorage();
builder.Services.AddForecastHubAuth();
builder.Services.AddForecastHubRequestLimits();
builder.Services.AddForecastHubRateLimits();
builder.Services.AddForecastHubHttpConventions();
builder.Services.AddForecastHubOpenApi();
builder.AddDemoMode(demoFlag);
builder.Services.AddForecastHubModels();
builder.Services.AddForecastHubMqtt();
builder.Services.AddWebhooks();
builder.Services.AddAlerts();

var app = builder.Build();

app.UseForecastHubPipeline();

app.MapHealth();
app.MapDashboard();
var api = app.MapGroup("/api/v1");
api.MapSites();
api.MapKeys();
api.MapObservations();
app.MapForecastHubModels(api);
api.MapWebhooks();
api.MapAlerts();

try
{
    // Checked and migrated before the host starts, so a file it cannot use stops it with one line
    // an operator can act on rather than the host's stack trace.
    if (!app.Services.GetRequiredService<Microsoft.Extensions.Options.IOptions<ForecastHub.Storage.StorageOptions>>().Value.IsPostgres)
    {
        await app.Services.GetRequiredService<ForecastHub.Storage.Migrations.MigrationRunner>().ApplyAsync();
    }
}
catch (ForecastHub.Storage.StorageStartupException error)
{
    await Console.Error.WriteLineAsync(error.Message);
    return 1;
}

app.Run();
return 0;
