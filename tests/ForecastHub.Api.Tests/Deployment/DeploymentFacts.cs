namespace ForecastHub.Api.Tests.Deployment;

/// <summary>What every deployment file must agree on.</summary>
internal static class DeploymentFacts
{
    public const string HttpPort = "8080";
    public const string DataDirectory = "/data";
    public const string AppDll = "/app/ForecastHub.Api.dll";
    public const string ReadyPath = "/health/ready";
    public const string LivePath = "/health/live";
}
