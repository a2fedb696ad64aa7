using ForecastHub.Api.Auth;
using ForecastHub.Api.Health;
using ForecastHub.Api.Hosting;
using ForecastHub.Api.Problems;
using ForecastHub.Api.Sites;

if (HealthProbe.IsRequested(args))
{
    return await HealthProbe.RunAsync(args, Console.Out);
}

var builder = WebApplication.CreateBuilder(args);

builder.AddForecastHubLogging();
builder.Services.AddForecastHubProblems();
builder.Services.AddForecastHubStorage();
builder.Services.AddForecastHubAuth();

var app = builder.Build();

app.UseForecastHubPipeline();

app.MapHealth();
var api = app.MapGroup("/api/v1");
api.MapSites();

app.Run();
return 0;
