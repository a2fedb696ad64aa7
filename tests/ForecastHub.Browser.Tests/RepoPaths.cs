using System.Reflection;

namespace ForecastHub.Browser.Tests;

/// <summary>Paths inside the repository, found by walking up from the test binaries to ForecastHub.sln.</summary>
internal static class RepoPaths
{
    private static readonly Lazy<string> RootPath = new(FindRoot);

    public static string Root => RootPath.Value;

    /// <summary>The API executable built with the same configuration as these tests.</summary>
    public static string ApiAssembly
    {
        get
        {
            var configuration = typeof(RepoPaths).Assembly.GetCustomAttribute<AssemblyConfigurationAttribute>()?.Configuration ?? "Debug";
            return Path.Combine(Root, "src", "ForecastHub.Api", "bin", configuration, "net10.0", "ForecastHub.Api.dll");
        }
    }

    /// <summary>Where screenshots go: the test project's TestResults folder, which CI keeps as an artifact.</summary>
    public static string Artifacts
    {
        get
        {
            var folder = Path.Combine(Root, "tests", "ForecastHub.Browser.Tests", "TestResults", "screenshots");
            Directory.CreateDirectory(folder);
            return folder;
        }
    }

    private static string FindRoot()
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
        {
            if (File.Exists(Path.Combine(dir.FullName, "ForecastHub.sln")))
            {
                return dir.FullName;
            }
        }
        throw new InvalidOperationException("ForecastHub.sln not found above " + AppContext.BaseDirectory);
    }
}
