using System.Text.Json;

namespace ForecastHub.Core.Tests.Support;

/// <summary>Reads committed fixtures from tests/ForecastHub.Core.Tests/Fixtures, found by walking up to ForecastHub.sln.</summary>
internal static class FixtureFile
{
    private static readonly Lazy<string> Folder = new(() =>
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
        {
            if (File.Exists(Path.Combine(dir.FullName, "ForecastHub.sln")))
            {
                return Path.Combine(dir.FullName, "tests", "ForecastHub.Core.Tests", "Fixtures");
            }
        }

        throw new InvalidOperationException("ForecastHub.sln not found above the test output folder.");
    });

    public static string PathOf(string name) => Path.Combine(Folder.Value, name);

    public static JsonElement Json(string name) => JsonDocument.Parse(File.ReadAllText(PathOf(name))).RootElement;

    public static double[] Doubles(this JsonElement element) => element.EnumerateArray().Select(e => e.GetDouble()).ToArray();
}
