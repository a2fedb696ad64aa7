using ForecastHub.Api.Hosting;
using Serilog;
using Serilog.Formatting.Compact;

if (HealthProbe.IsRequested(args))
{
    return await HealthProbe.RunAsync(args, Console.Out);
}

var builder = WebApplication.CreateBuilder(args);

builder.Services.AddSerilog(config => config
    .ReadFrom.Configuration(builder.Configuration)
    .Enrich.FromLogContext()
    .WriteTo.Console(new RenderedCompactJsonFormatter()));
builder.Services.AddProblemDetails();

var app = builder.Build();

app.UseSerilogRequestLogging();
app.UseExceptionHandler();
app.UseStatusCodePages();

app.MapGet("/health/live", () => TypedResults.Ok(new { status = "live" }))
    .WithName("Live")
    .WithSummary("The process is up.");

app.Run();
return 0;
