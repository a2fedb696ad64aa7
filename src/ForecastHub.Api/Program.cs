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
using ForecastHub.Api.Observations;
using ForecastHub.Api.OpenApi;
using ForecastHub.Api.Problems;
using ForecastHub.Api.Sites;
using ForecastHub.Api.Verification;

// Verbs that run without a web host: the container's health probe and the offline fit/backtest.
if (HealthProbe.IsRequested(args))
{
    return await HealthProbe.RunAsync(args, Console.Out);
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
builder.Services.AddForecastHubOpenApi();

// Storage first (the backend Storage:Provider names): its migrations run before anything else reads it at start.
builder.Services.AddForecastHubStorage();
builder.Services.AddForecastHubAuth();
builder.AddDemoMode(demoFlag);

// Features. AddSites before AddModels: the refit notification wraps the site cache.
builder.Services.AddServiceMetrics();
builder.Services.AddCluster();
builder.Services.AddSites();
builder.Services.AddModels();
builder.Services.AddForecasts();
builder.Services.AddVerification();
builder.Services.AddModelHealth();

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

app.Run();
return 0;
