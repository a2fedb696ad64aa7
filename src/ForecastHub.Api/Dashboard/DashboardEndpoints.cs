using System.Reflection;

namespace ForecastHub.Api.Dashboard;

/// <summary>The dashboard page at <c>/</c> and its static files under <c>/dashboard/</c>, embedded in the assembly
/// so the page is there wherever the executable runs from.</summary>
public static class DashboardEndpoints
{
    private const string ResourcePrefix = "dashboard/";

    private static readonly Dictionary<string, string> ContentTypes = new(StringComparer.OrdinalIgnoreCase)
    {
        [".html"] = "text/html; charset=utf-8",
        [".css"] = "text/css; charset=utf-8",
        [".js"] = "text/javascript; charset=utf-8",
        [".svg"] = "image/svg+xml",
    };

    public static IEndpointRouteBuilder MapDashboard(this IEndpointRouteBuilder app)
    {
        ArgumentNullException.ThrowIfNull(app);
        var assets = LoadAssets();
        var group = app.MapGroup("").WithTags("Dashboard").ExcludeFromDescription();
        group.MapGet("/", () => Asset(assets, "index.html")).WithName("Dashboard");
        group.MapGet("/dashboard/{file}", (string file) => Asset(assets, file)).WithName("DashboardAsset");
        return app;
    }

    private static IResult Asset(IReadOnlyDictionary<string, byte[]> assets, string file) =>
        assets.TryGetValue(file, out var bytes) && ContentTypes.TryGetValue(Path.GetExtension(file), out var type)
            ? Results.Bytes(bytes, type)
            : Results.Problem(statusCode: StatusCodes.Status404NotFound, title: "Not found",
                detail: $"The dashboard has no file named '{file}'.");

    private static Dictionary<string, byte[]> LoadAssets()
    {
        var assembly = Assembly.GetExecutingAssembly();
        var assets = new Dictionary<string, byte[]>(StringComparer.Ordinal);
        foreach (var name in assembly.GetManifestResourceNames().Where(n => n.StartsWith(ResourcePrefix, StringComparison.Ordinal)))
        {
            using var stream = assembly.GetManifestResourceStream(name)!;
            using var buffer = new MemoryStream();
            stream.CopyTo(buffer);
            assets[name[ResourcePrefix.Length..]] = buffer.ToArray();
        }
        return assets;
    }
}
