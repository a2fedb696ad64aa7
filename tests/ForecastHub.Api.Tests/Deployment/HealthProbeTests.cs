using System.Net;
using System.Net.Sockets;
using ForecastHub.Api.Hosting;
using ForecastHub.Api.Tests.Infrastructure;

namespace ForecastHub.Api.Tests.Deployment;

public sealed class HealthProbeTests
{
    [Fact]
    public async Task ProbeExitsZeroWhenTheHealthEndpointAnswersOk()
    {
        // A fresh database file each time: a file left in the build output by another build must not decide the answer.
        await using var factory = new ApiFactory();
        using var output = new StringWriter();

        var code = await HealthProbe.RunAsync(["healthcheck", "http://localhost/health/live"], output, factory.Server.CreateHandler());

        Assert.Equal(0, code);
        Assert.Contains("200", output.ToString(), StringComparison.Ordinal);
    }

    [Fact]
    public async Task ProbeExitsOneWhenTheEndpointAnswersAnError()
    {
        await using var factory = new ApiFactory();
        using var output = new StringWriter();

        var code = await HealthProbe.RunAsync(["healthcheck", "http://localhost/health/no-such-check"], output, factory.Server.CreateHandler());

        Assert.Equal(1, code);
        Assert.Contains("404", output.ToString(), StringComparison.Ordinal);
    }

    [Fact]
    public async Task ProbeExitsOneWhenNothingListens()
    {
        using var output = new StringWriter();

        var code = await HealthProbe.RunAsync(["healthcheck", $"http://127.0.0.1:{ClosedPort()}/health/ready"], output);

        Assert.Equal(1, code);
        Assert.Contains("unreachable", output.ToString(), StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("not a url")]
    [InlineData("ftp://127.0.0.1/health/ready")]
    public async Task ProbeExitsTwoOnABadTarget(string target)
    {
        using var output = new StringWriter();

        var code = await HealthProbe.RunAsync(["healthcheck", target], output);

        Assert.Equal(2, code);
        Assert.StartsWith("usage:", output.ToString(), StringComparison.Ordinal);
    }

    [Fact]
    public void OnlyTheFirstArgumentSelectsTheProbe()
    {
        Assert.True(HealthProbe.IsRequested(["healthcheck"]));
        Assert.False(HealthProbe.IsRequested(["--urls", "healthcheck"]));
        Assert.False(HealthProbe.IsRequested([]));
    }

    private static int ClosedPort()
    {
        using var listener = new TcpListener(IPAddress.Loopback, 0);
        listener.Start();
        var port = ((IPEndPoint)listener.LocalEndpoint).Port;
        listener.Stop();
        return port;
    }
}
