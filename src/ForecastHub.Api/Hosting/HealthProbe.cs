namespace ForecastHub.Api.Hosting;

/// <summary>
/// The "healthcheck" verb: asks a health URL and exits 0 on a 2xx answer, 1 otherwise.
/// Container images without curl use it for HEALTHCHECK; it never starts the web host.
/// </summary>
public static class HealthProbe
{
    public const string Verb = "healthcheck";

    public static readonly Uri DefaultUri = new("http://127.0.0.1:8080/health/ready");

    private static readonly TimeSpan Timeout = TimeSpan.FromSeconds(4);

    public static bool IsRequested(IReadOnlyList<string> args) =>
        args.Count > 0 && string.Equals(args[0], Verb, StringComparison.Ordinal);

    /// <summary>Exit code 0 healthy, 1 unhealthy or unreachable, 2 bad usage.</summary>
    public static async Task<int> RunAsync(IReadOnlyList<string> args, TextWriter output, HttpMessageHandler? handler = null)
    {
        ArgumentNullException.ThrowIfNull(args);
        ArgumentNullException.ThrowIfNull(output);
        var target = DefaultUri;
        if (args.Count > 2 || (args.Count == 2 && !TryParseHttpUri(args[1], out target)))
        {
            await output.WriteLineAsync($"usage: {Verb} [http://host:port/health/ready]");
            return 2;
        }

        using var client = handler is null ? new HttpClient() : new HttpClient(handler, disposeHandler: false);
        client.Timeout = Timeout;
        try
        {
            using var response = await client.GetAsync(target);
            await output.WriteLineAsync($"{target} answered {(int)response.StatusCode}");
            return response.IsSuccessStatusCode ? 0 : 1;
        }
        catch (Exception ex) when (ex is HttpRequestException or TaskCanceledException)
        {
            await output.WriteLineAsync($"{target} unreachable: {ex.GetType().Name}");
            return 1;
        }
    }

    private static bool TryParseHttpUri(string text, out Uri uri)
    {
        if (Uri.TryCreate(text, UriKind.Absolute, out var parsed) && (parsed.Scheme == Uri.UriSchemeHttp || parsed.Scheme == Uri.UriSchemeHttps))
        {
            uri = parsed;
            return true;
        }

        uri = DefaultUri;
        return false;
    }
}
