using System.Globalization;
using System.Text;
using ForecastHub.Api.CommandLine;
using ForecastHub.Api.Tests.Infrastructure;

namespace ForecastHub.Api.Tests.Loggers;

/// <summary>The import verb against the real pipeline: batches, the file's own line numbers in the
/// report, and a resume after a lost answer that stores nothing twice.</summary>
public sealed class ImportVerbTests : IDisposable
{
    private readonly string folder = Path.Combine(Path.GetTempPath(), "forecasthub-import-" + Guid.NewGuid().ToString("N"));

    public ImportVerbTests() => Directory.CreateDirectory(folder);

    public void Dispose() => Directory.Delete(folder, recursive: true);

    /// <summary>Passes requests to the service; the chosen call reaches the service, but its answer is lost on the way back.</summary>
    private sealed class LostAnswer(HttpMessageHandler service, int failingCall) : DelegatingHandler(service)
    {
        private int calls;

        protected override async Task<HttpResponseMessage> SendAsync(HttpRequestMessage request, CancellationToken cancellationToken)
        {
            var response = await base.SendAsync(request, cancellationToken);
            if (Interlocked.Increment(ref calls) == failingCall)
            {
                response.Dispose();
                throw new HttpRequestException("connection reset while reading the answer");
            }
            return response;
        }
    }

    private string File2500(out int badLine)
    {
        var text = new StringBuilder("time,value\n");
        var readings = Some.HourlyReadings(2500, ApiFactory.Now);
        badLine = 0;
        for (var i = 0; i < readings.Count; i++)
        {
            text.Append(Some.Iso(readings[i].Time)).Append(',').Append(readings[i].Value.ToString(CultureInfo.InvariantCulture)).Append('\n');
            if (i == 2200)
            {
                text.Append("2025-02-30T00:00:00Z,1\n");
                badLine = i + 3;
            }
        }
        var path = Path.Combine(folder, "archive.csv");
        File.WriteAllText(path, text.ToString());
        return path;
    }

    private static async Task<(int Code, string Output, string Errors)> Import(ApiFactory factory, HttpMessageHandler handler, string file, params string[] more)
    {
        using var output = new StringWriter(CultureInfo.InvariantCulture);
        using var errors = new StringWriter(CultureInfo.InvariantCulture);
        string[] args = ["import", file, "--url", factory.Server.BaseAddress.ToString(), "--site", "orchard-1", "--key", ApiFactory.AdminKey, "--batch", "1000", .. more];
        var code = await ImportVerb.RunAsync(args, output, errors, handler, _ => Task.CompletedTask);
        return (code, output.ToString(), errors.ToString());
    }

    [Fact]
    public async Task AFailedImportResumesAfterTheLastAnsweredBatchAndStoresEveryRowOnce()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        (await client.CreateSite()).Dispose();
        var file = File2500(out var badLine);
        using var service = factory.Server.CreateHandler();
        using var lossy = new LostAnswer(service, failingCall: 2);

        var (failedCode, _, failedErrors) = await Import(factory, lossy, file, "--retries", "0");
        var progress = await File.ReadAllTextAsync(file + ".import-orchard-1");
        var (code, output, errors) = await Import(factory, service, file);

        Assert.Equal(1, failedCode);
        Assert.Contains("records 1,001 to 2,000", failedErrors, StringComparison.Ordinal);
        Assert.Equal("1000", progress);
        Assert.True(code == 0, errors);
        Assert.Contains("Resuming after 1,000 of 2,501 records", output, StringComparison.Ordinal);
        Assert.Contains("2,501 records, 500 accepted, 1,000 duplicates", output, StringComparison.Ordinal);
        Assert.Contains($"line {badLine}: 2025-02-30 is not a calendar date", output, StringComparison.Ordinal);
        Assert.False(File.Exists(file + ".import-orchard-1"));
        Assert.Equal(2500, (await client.AllReadings()).Count);
    }

    [Fact]
    public async Task ALostAnswerIsRetriedWithinOneRun()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        (await client.CreateSite()).Dispose();
        var file = File2500(out _);
        using var service = factory.Server.CreateHandler();
        using var lossy = new LostAnswer(service, failingCall: 2);

        var (code, output, errors) = await Import(factory, lossy, file);

        Assert.True(code == 0, errors);
        Assert.Contains("1,500 accepted, 1,000 duplicates", output, StringComparison.Ordinal);
        Assert.Equal(2500, (await client.AllReadings()).Count);
    }

    [Fact]
    public async Task AWholeFileInTheWrongUnitStopsAtTheFirstBatchWithTheReason()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateAdminClient();
        (await client.CreateSite()).Dispose();
        var path = Path.Combine(folder, "kelvin.csv");
        await File.WriteAllTextAsync(path, Some.Csv(Some.HourlyReadings(48, ApiFactory.Now).Select(r => (r.Time, r.Value + 273.15))));
        using var service = factory.Server.CreateHandler();

        var (code, _, errors) = await Import(factory, service, path);

        Assert.Equal(1, code);
        Assert.Contains("send unit=K", errors, StringComparison.Ordinal);
        Assert.Empty(await client.AllReadings());
    }
}
