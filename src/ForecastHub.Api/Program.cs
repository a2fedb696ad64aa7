using ForecastHub.Api.Alerts;
using ForecastHub.Api.Http;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Cluster;
using ForecastHub.Api.CommandLine;
using ForecastHub.Api.Dashboard;
using ForecastHub.Api.Demo;
using ForecastHub.Api.Forecasts;
using ForecastHub.Api.Health;
using ForecastHub.Api.Hosting;
using ForecastHub.Api.Keys;
using ForecastHub.Api.Metrics;
using ForecastHub.Api.Models;
using ForecastHub.Api.Mqtt;
using ForecastHub.Api.Observations;
using ForecastHub.Api.OpenApi;
using ForecastHub.Api.Problems;
using ForecastHub.Api.Sites;
using ForecastHub.Api.Verification;
using ForecastHub.Api.Webhooks;
using ForecastHub.Storage;

// Verbs that run without a web host: the container's health probe and the offline fit/backtest.
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

// Plumbing.
builder.AddForecastHubLogging();
builder.Services.AddForecastHubProblems();
builder.Services.AddForecastHubRequestLimits();
builder.Services.AddForecastHubRateLimits();
builder.Services.AddForecastHubHttpConventions();
builder.Services.AddForecastHubOpenApi();

// Storage first (the backend Storage:Provider names): its migrations run before anything else reads it at start.
builder.Services.AddForecastHubStorage();
builder.Services.AddForecastHubAuth();
builder.AddDemoMode(demoFlag);

// Features. AddSites before AddModels: the refit notification wraps the site cache.
// AddWebhooks and AddAlerts after AddModels: alerts wrap the reading and model stores.
builder.Services.AddForecastHubMetrics();
builder.Services.AddCluster();
builder.Services.AddSites();
builder.Services.AddModels();
builder.Services.AddForecasts();
builder.Services.AddVerification();
builder.Services.AddModelHealth();
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
api.MapModels();
api.MapForecasts();
api.MapVerification();
api.MapModelHealth();
app.MapMetrics();
api.MapWebhooks();
api.MapAlerts();

try
{
    // Checked and migrated before the host starts, so storage it cannot use stops it with one line
    // an operator can act on rather than the host's stack trace.
    await app.Services.GetRequiredService<IStorageSchema>().MigrateAsync();
}
catch (StorageStartupException error)
{
    await Console.Error.WriteLineAsync(error.Message);
    return 1;
}

app.Run();
return 0;
