using System.Diagnostics;
using ForecastHub.Api.Tests.TestSupport;

namespace ForecastHub.Api.Tests.Deployment;

public sealed class SystemdUnitTests
{
    private static readonly string UnitPath = RepoFiles.PathOf("deploy", "forecasthub.service");

    [Fact]
    public void UnitHasTheThreeSectionsAndStartsThePublishedApi()
    {
        var unit = ParseUnit(File.ReadAllText(UnitPath));

        Assert.Equal(["Install", "Service", "Unit"], unit.Keys.Order());
        Assert.Equal("/usr/bin/dotnet /opt/forecasthub/ForecastHub.Api.dll", Single(unit, "ExecStart"));
        var storagePath = Value(unit, "Environment").Single(e => e.StartsWith("Storage__Path=", StringComparison.Ordinal)).Split('=', 2)[1];
        Assert.StartsWith($"/var/lib/{Single(unit, "StateDirectory")}/", storagePath, StringComparison.Ordinal);
        Assert.Equal("multi-user.target", unit["Install"].Single(p => p.Key == "WantedBy").Value);
    }

    [Theory]
    [InlineData("DynamicUser", "yes")]
    [InlineData("NoNewPrivileges", "yes")]
    [InlineData("ProtectSystem", "strict")]
    [InlineData("ProtectHome", "yes")]
    [InlineData("PrivateTmp", "yes")]
    [InlineData("PrivateDevices", "yes")]
    [InlineData("CapabilityBoundingSet", "")]
    [InlineData("RestrictAddressFamilies", "AF_INET AF_INET6 AF_UNIX")]
    [InlineData("SystemCallFilter", "@system-service")]
    [InlineData("RestrictSUIDSGID", "yes")]
    [InlineData("UMask", "0077")]
    [InlineData("Restart", "on-failure")]
    // The .NET JIT needs writable and executable pages, so this one must stay off.
    [InlineData("MemoryDenyWriteExecute", "no")]
    public void ServiceIsHardened(string directive, string expected)
    {
        var unit = ParseUnit(File.ReadAllText(UnitPath));

        Assert.Equal(expected, Single(unit, directive));
    }

    [Fact]
    public void SystemdAnalyzeVerifiesTheUnitWithoutComplaint()
    {
        // systemd-analyze exits 0 even for unknown keys, so any line naming the unit file is a failure.
        var info = new ProcessStartInfo("systemd-analyze", ["verify", UnitPath]) { RedirectStandardError = true, RedirectStandardOutput = true };
        Process process;
        try
        {
            process = Process.Start(info)!;
        }
        catch (System.ComponentModel.Win32Exception)
        {
            Assert.Fail("systemd-analyze is missing: install the Debian package 'systemd' (.ci/run does)");
            return;
        }

        using (process)
        {
            var errors = process.StandardError.ReadToEnd() + process.StandardOutput.ReadToEnd();
            process.WaitForExit();

            Assert.Equal(0, process.ExitCode);
            Assert.DoesNotContain("forecasthub.service", errors, StringComparison.Ordinal);
        }
    }

    [Fact]
    public void ParserRejectsAKeyOutsideASection()
    {
        Assert.Throws<InvalidDataException>(() => ParseUnit("ExecStart=/bin/true\n[Service]\n"));
    }

    private static string Single(Dictionary<string, List<KeyValuePair<string, string>>> unit, string key) => Value(unit, key).Single();

    private static IEnumerable<string> Value(Dictionary<string, List<KeyValuePair<string, string>>> unit, string key) =>
        unit["Service"].Concat(unit["Unit"]).Where(p => p.Key == key).Select(p => p.Value);

    private static Dictionary<string, List<KeyValuePair<string, string>>> ParseUnit(string text)
    {
        var sections = new Dictionary<string, List<KeyValuePair<string, string>>>();
        List<KeyValuePair<string, string>>? current = null;
        foreach (var (raw, number) in text.Split('\n').Select((l, i) => (l.Trim(), i + 1)))
        {
            if (raw.Length == 0 || raw.StartsWith('#') || raw.StartsWith(';'))
            {
                continue;
            }

            if (raw.StartsWith('[') && raw.EndsWith(']'))
            {
                current = [];
                sections.Add(raw[1..^1], current);
                continue;
            }

            var equals = raw.IndexOf('=', StringComparison.Ordinal);
            if (current is null || equals <= 0)
            {
                throw new InvalidDataException($"line {number}: '{raw}' is neither a section nor a key=value inside one");
            }

            current.Add(new(raw[..equals].Trim(), raw[(equals + 1)..].Trim()));
        }

        return sections;
    }
}
