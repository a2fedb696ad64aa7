using System.Text.Json;

namespace ForecastHub.Core.Tests.Support;

/// <summary>Reads committed JSON fixtures from tests/ForecastHub.Core.Tests/Fixtures, found by walking up to ForecastHub.sln.</summary>
public static class ReferenceFixture
{
    public static JsonElement Load(string fileName)
    {
        using var document = JsonDocument.Parse(File.ReadAllText(PathOf(fileName)));
        return document.RootElement.Clone();
    }

    /// <summary>Full path of a file in the Fixtures folder (for non-JSON fixtures such as CSV).</summary>
    public static string PathOf(string fileName)
    {
        var directory = new DirectoryInfo(AppContext.BaseDirectory);
        while (directory is not null && !File.Exists(Path.Combine(directory.FullName, "ForecastHub.sln")))
        {
            directory = directory.Parent;
        }

        if (directory is null)
        {
            throw new InvalidOperationException("ForecastHub.sln not found above the test output folder.");
        }

        return Path.Combine(directory.FullName, "tests", "ForecastHub.Core.Tests", "Fixtures", fileName);
    }

    public static double[] Doubles(this JsonElement element, string property) =>
        element.GetProperty(property).EnumerateArray().Select(e => e.GetDouble()).ToArray();

    public static double Number(this JsonElement element, string property) => element.GetProperty(property).GetDouble();

    public static int Whole(this JsonElement element, string property) => element.GetProperty(property).GetInt32();
}
