namespace ForecastHub.Api.CommandLine;

/// <summary>
/// Checks the arguments before anything starts: <c>--help</c>, <c>-h</c>, <c>-?</c> and <c>help</c>
/// print the usage, an unknown verb or a malformed option prints a clear error (exit 2), and only
/// arguments the configuration system can read (<c>--Section:Key=value</c>, <c>--urls URL</c>,
/// <c>--demo</c>) go on to start the server. Nothing here opens a database or binds a port.
/// </summary>
public static class ServerCommandLine
{
    public const string Usage = """
        Usage:
          ForecastHub.Api [--demo] [--urls URL] [--Section:Key=value ...]
              run the service (configuration keys as in the README's table)
          ForecastHub.Api fit FILE.csv [options]        fit a model to a logger file, no server
          ForecastHub.Api backtest FILE.csv [options]   backtest a logger file, no server
          ForecastHub.Api import FILE.csv --url URL --site ID [options]
              post a large file to a running service in batches, resumable
          ForecastHub.Api healthcheck [URL]             exit 0 when the service answers ready
          ForecastHub.Api VERB --help                   the options of one verb

        Exit codes: 0 done, 1 failed, 2 bad arguments or input.
        """;

    private static readonly string[] HelpWords = ["--help", "-h", "-?", "/?", "help"];

    // Top-level keys the host reads without a section (ASP.NET Core's host settings).
    private static readonly string[] HostKeys = ["urls", "environment", "contentRoot", "applicationName", "http_ports", "https_ports", "AllowedHosts"];

    /// <summary>Null: start the server with these arguments. Otherwise the process exit code, after the
    /// usage or the error has been written.</summary>
    public static int? Intercept(IReadOnlyList<string> args, TextWriter output, TextWriter errors)
    {
        ArgumentNullException.ThrowIfNull(args);
        ArgumentNullException.ThrowIfNull(output);
        ArgumentNullException.ThrowIfNull(errors);
        if (args.Any(a => HelpWords.Contains(a, StringComparer.OrdinalIgnoreCase)))
        {
            output.WriteLine(Usage);
            return 0;
        }
        var error = Check(args);
        if (error is null)
        {
            return null;
        }
        errors.WriteLine($"error: {error}");
        errors.WriteLine("Run with --help for the verbs and options.");
        return 2;
    }

    /// <summary>The first problem with server arguments, or null when the configuration system can read them all.</summary>
    public static string? Check(IReadOnlyList<string> args)
    {
        ArgumentNullException.ThrowIfNull(args);
        for (var i = 0; i < args.Count; i++)
        {
            var arg = args[i];
            if (arg == "--demo")
            {
                continue;
            }
            if (arg.StartsWith('-') && !arg.StartsWith("--", StringComparison.Ordinal))
            {
                return $"unknown option '{arg}'.";
            }
            var prefixed = arg.StartsWith("--", StringComparison.Ordinal) || arg.StartsWith('/');
            var equals = arg.IndexOf('=', StringComparison.Ordinal);
            if (!prefixed && equals < 0)
            {
                return i == 0
                    ? $"unknown verb '{arg}'; the verbs are fit, backtest, import and healthcheck."
                    : $"'{arg}' is not an option; options look like --Section:Key=value.";
            }
            var name = (equals < 0 ? arg : arg[..equals]).TrimStart('-', '/');
            if (equals == arg.Length - 1 && name.Length > 0)
            {
                continue; // '--Section=' (a section with no value of its own), as the test host passes parents of nested keys
            }
            if (name.Length == 0 || (!name.Contains(':', StringComparison.Ordinal) && !HostKeys.Contains(name, StringComparer.OrdinalIgnoreCase)))
            {
                return $"unknown option '{(equals < 0 ? arg : arg[..equals])}'; configuration keys have a section (--Storage:Path=FILE), or use --urls, --environment or --demo.";
            }
            if (equals < 0)
            {
                if (i + 1 >= args.Count || args[i + 1].StartsWith("--", StringComparison.Ordinal))
                {
                    return $"option '{arg}' needs a value (--{name}=VALUE or --{name} VALUE).";
                }
                i++;
            }
        }
        return null;
    }
}
