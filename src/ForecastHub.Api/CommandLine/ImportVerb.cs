using System.Globalization;
using System.Net;
using System.Net.Http.Headers;
using System.Text;
using System.Text.Json;
using ForecastHub.Api.Observations;

namespace ForecastHub.Api.CommandLine;

/// <summary>
/// <c>import FILE.csv --url URL --site ID</c>: posts a file of any size to a running service in
/// batches of whole CSV records (the header repeated on each), so every row goes through the
/// service's own rules. After each answered batch the count of records done is written to
/// <c>FILE.csv.import-SITE</c>; a rerun after a failure starts after them, and a batch that was
/// stored but whose answer was lost is sent again as harmless duplicates (the service counts them
/// and stores nothing twice). The progress file is removed when the whole file is done.
/// </summary>
public static class ImportVerb
{
    public const string Verb = "import";
    public const int DefaultBatch = 10_000;
    private const int DefaultRetries = 5;
    private const string KeyVariable = "FORECASTHUB_KEY";

    public const string Usage = """
        Usage: ForecastHub.Api import FILE.csv --url URL --site ID [options]

        Posts FILE.csv to POST URL/api/v1/sites/ID/observations in batches, with the service's rules
        (the same CSV layout options as fit), resumable: a rerun after a failure continues where the
        last answered batch ended (progress in FILE.csv.import-ID) and stores nothing twice.

        Options:
          --url URL                    the service, e.g. http://127.0.0.1:5000
          --site ID                    the site to import into (it must exist)
          --key KEY                    an ingest or admin key (default: the FORECASTHUB_KEY variable)
          --batch N                    records per request (default: 10000; the service takes up to 50000 or 8 MiB)
          --retries N                  attempts per batch after a network or server failure (default: 5, backoff 1, 2, 4 ... s)
          --on-conflict reject|replace what a different value for a stored time does (default: reject)
          --unit C|F|K, --time-column, --value-column, --unit-column, --separator, --decimal, --local-times
                                       passed to the service as its query parameters (see fit --help)

        Exit codes: 0 done (rows may have been rejected: each is listed), 1 the service failed or refused
        the batch (rerun to resume), 2 bad arguments or file.
        """;

    public static bool IsRequested(IReadOnlyList<string> args) => args is { Count: > 0 } && args[0] == Verb;

    private sealed record Options(string File, Uri Url, string Site, string Key, int Batch, int Retries, string Query, char Separator);

    private static readonly Dictionary<string, string> QueryNames = new(StringComparer.Ordinal)
    {
        ["--unit"] = "unit", ["--on-conflict"] = "onConflict", ["--time-column"] = "timeColumn", ["--value-column"] = "valueColumn",
        ["--unit-column"] = "unitColumn", ["--separator"] = "separator", ["--decimal"] = "decimal",
    };

    public static async Task<int> RunAsync(IReadOnlyList<string> args, TextWriter output, TextWriter errors,
        HttpMessageHandler? handler = null, Func<TimeSpan, Task>? wait = null)
    {
        ArgumentNullException.ThrowIfNull(args);
        ArgumentNullException.ThrowIfNull(output);
        ArgumentNullException.ThrowIfNull(errors);
        if (args.Skip(1).Any(a => a is "--help" or "-h"))
        {
            await output.WriteLineAsync(Usage).ConfigureAwait(false);
            return 0;
        }
        var (options, error) = Parse(args.Skip(1).ToList());
        if (options is null)
        {
            await errors.WriteLineAsync($"error: {error}\nRun 'import --help' for the options.").ConfigureAwait(false);
            return 2;
        }
        var text = await File.ReadAllTextAsync(options.File).ConfigureAwait(false);
        var records = CsvReadings.Records(text, options.Separator);
        var header = records[0].Text;
        var rows = records.Skip(1).Where(r => r.Text.Trim().Length > 0).ToList();
        var progressPath = $"{options.File}.import-{options.Site}";
        var done = File.Exists(progressPath) && int.TryParse(await File.ReadAllTextAsync(progressPath).ConfigureAwait(false),
            NumberStyles.None, CultureInfo.InvariantCulture, out var resumed) ? Math.Min(resumed, rows.Count) : 0;
        if (done > 0)
        {
            await output.WriteLineAsync($"Resuming after {done:N0} of {rows.Count:N0} records (from {progressPath}).").ConfigureAwait(false);
        }

        using var client = handler is null ? new HttpClient() : new HttpClient(handler, disposeHandler: false);
        client.Timeout = TimeSpan.FromMinutes(5);
        client.DefaultRequestHeaders.Authorization = new AuthenticationHeaderValue("Bearer", options.Key);
        var target = new Uri(options.Url, $"api/v1/sites/{Uri.EscapeDataString(options.Site)}/observations{options.Query}");
        wait ??= Task.Delay;
        var totals = new Dictionary<string, int>(StringComparer.Ordinal) { ["accepted"] = 0, ["duplicates"] = 0, ["replaced"] = 0, ["flagged"] = 0 };
        var rejected = new List<RejectedReading>();
        using var progress = CommandLineProgress.Start(errors, "import records");
        while (done < rows.Count)
        {
            var batch = rows.Skip(done).Take(options.Batch).ToList();
            var body = new StringBuilder(header).Append('\n');
            foreach (var row in batch)
            {
                body.Append(row.Text).Append('\n');
            }
            var (answer, failure) = await PostWithRetries(client, target, body.ToString(), options.Retries, wait).ConfigureAwait(false);
            if (answer is null)
            {
                progress.Done();
                await errors.WriteLineAsync($"error: records {done + 1:N0} to {done + batch.Count:N0}: {failure}").ConfigureAwait(false);
                await errors.WriteLineAsync($"{done:N0} of {rows.Count:N0} records are done; run the same command again to resume.").ConfigureAwait(false);
                return 1;
            }
            foreach (var name in totals.Keys)
            {
                totals[name] += answer.Value.TryGetProperty(name, out var n) ? n.GetInt32() : 0;
            }
            foreach (var r in answer.Value.GetProperty("rejected").EnumerateArray())
            {
                // The service numbers rows within the batch; report the file's own line.
                var index = r.GetProperty("index").GetInt32();
                rejected.Add(new RejectedReading(done + index, batch[index].Line,
                    r.TryGetProperty("time", out var t) ? t.GetString() : null, r.GetProperty("reason").GetString() ?? ""));
            }
            done += batch.Count;
            await File.WriteAllTextAsync(progressPath, done.ToString(CultureInfo.InvariantCulture)).ConfigureAwait(false);
            progress.Report(done, rows.Count);
        }
        progress.Done();
        File.Delete(progressPath);
        await output.WriteLineAsync($"Imported {options.File} into {options.Site}: {rows.Count:N0} records, {totals["accepted"]:N0} accepted, {totals["duplicates"]:N0} duplicates, {totals["replaced"]:N0} replaced, {totals["flagged"]:N0} flagged, {rejected.Count:N0} rejected").ConfigureAwait(false);
        foreach (var line in OfflineReportText.RejectedLines(rejected))
        {
            await output.WriteLineAsync(line).ConfigureAwait(false);
        }
        return 0;
    }

    // The answer's JSON (an OK answer, or the 422 of a batch whose rows were all rejected), or why not.
    private static async Task<(JsonElement? Answer, string? Failure)> PostWithRetries(HttpClient client, Uri target, string body, int retries, Func<TimeSpan, Task> wait)
    {
        string failure = "";
        for (var attempt = 0; attempt <= retries; attempt++)
        {
            if (attempt > 0)
            {
                await wait(TimeSpan.FromSeconds(Math.Pow(2, attempt - 1))).ConfigureAwait(false);
            }
            try
            {
                using var content = new StringContent(body, Encoding.UTF8, "text/csv");
                using var response = await client.PostAsync(target, content).ConfigureAwait(false);
                var text = await response.Content.ReadAsStringAsync().ConfigureAwait(false);
                var json = text.Length > 0 && text.TrimStart().StartsWith('{') ? JsonDocument.Parse(text).RootElement.Clone() : (JsonElement?)null;
                if (response.IsSuccessStatusCode && json is not null)
                {
                    return (json, null);
                }
                if (response.StatusCode == HttpStatusCode.UnprocessableEntity && json is { } all && all.TryGetProperty("rejected", out _))
                {
                    return (all, null);
                }
                failure = $"the service answered {(int)response.StatusCode}: {Detail(json) ?? text}";
                if ((int)response.StatusCode < 500 && response.StatusCode != HttpStatusCode.TooManyRequests)
                {
                    return (null, failure);
                }
            }
            catch (HttpRequestException e)
            {
                failure = $"the service could not be reached: {e.Message}";
            }
            catch (TaskCanceledException)
            {
                failure = "the service did not answer in time";
            }
        }
        return (null, failure);
    }

    private static string? Detail(JsonElement? json) =>
        json is { } j && j.TryGetProperty("detail", out var d) ? d.GetString() : null;

    private static (Options? Options, string? Error) Parse(List<string> args)
    {
        string? file = null;
        var values = new Dictionary<string, string>(StringComparer.Ordinal);
        var query = new List<string>();
        for (var i = 0; i < args.Count; i++)
        {
            var arg = args[i];
            if (arg == "--local-times")
            {
                query.Add("localTimes=true");
                continue;
            }
            if (!arg.StartsWith("--", StringComparison.Ordinal))
            {
                if (file is not null)
                {
                    return (null, $"only one file is imported; '{arg}' is a second one.");
                }
                file = arg;
                continue;
            }
            var (name, value) = arg.Contains('=', StringComparison.Ordinal)
                ? (arg[..arg.IndexOf('=', StringComparison.Ordinal)], arg[(arg.IndexOf('=', StringComparison.Ordinal) + 1)..])
                : (arg, i + 1 < args.Count ? args[++i] : null);
            if (name is not ("--url" or "--site" or "--key" or "--batch" or "--retries") && !QueryNames.ContainsKey(name))
            {
                return (null, $"unknown option '{name}'.");
            }
            if (value is null)
            {
                return (null, $"option '{name}' needs a value.");
            }
            if (QueryNames.TryGetValue(name, out var queryName))
            {
                query.Add($"{queryName}={Uri.EscapeDataString(value)}");
            }
            values[name] = value;
        }
        if (file is null)
        {
            return (null, "name the CSV file to import.");
        }
        if (!File.Exists(file))
        {
            return (null, $"file '{file}' does not exist.");
        }
        if (!values.TryGetValue("--url", out var url) || !Uri.TryCreate(url.TrimEnd('/') + "/", UriKind.Absolute, out var uri) || uri.Scheme is not ("http" or "https"))
        {
            return (null, "give the service's address with --url http://HOST:PORT.");
        }
        if (!values.TryGetValue("--site", out var site))
        {
            return (null, "name the site with --site ID.");
        }
        var key = values.GetValueOrDefault("--key") ?? Environment.GetEnvironmentVariable(KeyVariable);
        if (string.IsNullOrEmpty(key))
        {
            return (null, $"give an ingest key with --key KEY or the {KeyVariable} variable.");
        }
        var (layout, _, layoutError) = CsvLayout.From(values.GetValueOrDefault("--time-column"), values.GetValueOrDefault("--value-column"),
            values.GetValueOrDefault("--unit-column"), values.GetValueOrDefault("--separator"), values.GetValueOrDefault("--decimal"));
        if (layout is null)
        {
            return (null, layoutError);
        }
        var batch = DefaultBatch;
        if (values.TryGetValue("--batch", out var b) && (!int.TryParse(b, NumberStyles.None, CultureInfo.InvariantCulture, out batch) || batch < 1 || batch > ObservationsEndpoints.MaxReadings))
        {
            return (null, $"--batch must be a whole number from 1 to {ObservationsEndpoints.MaxReadings}.");
        }
        var retries = DefaultRetries;
        if (values.TryGetValue("--retries", out var r) && (!int.TryParse(r, NumberStyles.None, CultureInfo.InvariantCulture, out retries) || retries > 20))
        {
            return (null, "--retries must be a whole number from 0 to 20.");
        }
        return (new Options(file, uri, site, key, batch, retries, query.Count == 0 ? "" : "?" + string.Join('&', query), layout.Separator), null);
    }
}
