using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Keys;

namespace ForecastHub.Api.Tests.Security;

/// <summary>Serilog routes every host of the process through one static logger, so this test
/// runs alone: then the log file it reads holds exactly its own host's lines.</summary>
[CollectionDefinition(nameof(LogCaptureTests), DisableParallelization = true)]
public sealed class LogCaptureCollection;

[Collection(nameof(LogCaptureTests))]
public sealed class LogCaptureTests
{
    [Fact]
    public async Task LogsNeverContainAKeyOrTheAuthorizationHeader()
    {
        var logFile = Path.Combine(Path.GetTempPath(), "forecasthub-tests", $"{Guid.NewGuid():N}.log");
        await using (var factory = new ApiFactory
        {
            Settings = new Dictionary<string, string?>
            {
                ["Serilog:MinimumLevel:Default"] = "Debug",
                ["Serilog:Using:0"] = "Serilog.Sinks.File",
                ["Serilog:WriteTo:0:Name"] = "File",
                ["Serilog:WriteTo:0:Args:path"] = logFile,
            },
        })
        {
            using var admin = factory.CreateAdminClient();
            using var client = factory.CreateClient();
            var read = await admin.IssueKey("read");
            var ingest = await admin.IssueKey("ingest", "orchard-1");
            using var ok = await client.GetWith("/api/v1/sites", read.Secret);
            using var forbidden = await client.GetWith("/api/v1/keys", ingest.Secret);
            using var unknown = await client.GetWith("/api/v1/sites", "fhk_unknown-but-secret-looking-value");
            await admin.Revoke(read.Id);
            using var revoked = await client.GetWith("/api/v1/sites", read.Secret);
            var log = ReadShared(logFile);

            Assert.Contains("/api/v1/sites", log, StringComparison.Ordinal);
            Assert.Contains(read.Id, log, StringComparison.Ordinal);
            foreach (var secret in new[] { read.Secret, ingest.Secret, ApiFactory.AdminKey, "fhk_unknown-but-secret-looking-value" })
            {
                Assert.DoesNotContain(secret, log, StringComparison.Ordinal);
            }
            Assert.DoesNotContain("Bearer fhk_", log, StringComparison.Ordinal);
            Assert.DoesNotContain("Bearer test-admin", log, StringComparison.Ordinal);
        }
        File.Delete(logFile);
    }

    private static string ReadShared(string path)
    {
        using var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete);
        using var reader = new StreamReader(stream);
        return reader.ReadToEnd();
    }
}
