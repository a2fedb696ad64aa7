namespace ForecastHub.Api.Tests.TestSupport;

/// <summary>Finds files in the repository by walking up from the test binaries to ForecastHub.sln.</summary>
public static class RepoFiles
{
    private static readonly Lazy<string> RootPath = new(FindRoot);

    public static string Root => RootPath.Value;

    public static string PathOf(params string[] parts) => Path.Combine([Root, .. parts]);

    public static string Read(params string[] parts) => File.ReadAllText(PathOf(parts));

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
