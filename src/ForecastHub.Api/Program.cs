using ForecastHub.Api.Auth;
using ForecastHub.Api.CommandLine;
using ForecastHub.Api.Dashboard;
using ForecastHub.Api.Demo;
using ForecastHub.Api.Health;
using ForecastHub.Api.Hosting;
using ForecastHub.Api.Keys;
using ForecastHub.Api.Observations;
using ForecastHub.Api.OpenApi;
using ForecastHub.Api.Problems;
using ForecastHub.Api.Sites;

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

builder.AddForecastHubLogging();
builder.Services.AddForecastHubProblems();
builder.Services.AddForecastHubStorage();
builder.Services.AddForecastHubAuth();
builder.Services.AddForecastHubRequestLimits();
builder.Services.AddForecastHubRateLimits();
builder.Services.AddForecastHubOpenApi();
builder.AddDemoMode(demoFlag);
builder.Services.AddForecastHubModels();

var app = builder.Build();

app.UseForecastHubPipeline();

app.MapHealth();
app.MapDashboard();
var api = app.MapGroup("/api/v1");
api.MapSites();
api.MapKeys();
api.MapObservations();
app.MapForecastHubModels(api);

app.Run();
return 0;
