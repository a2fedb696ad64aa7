using System.Net.Http.Headers;
using System.Text;
using System.Text.Json.Nodes;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.Keys;
using ForecastHub.Api.Tests.TestSupport;

namespace ForecastHub.Api.Tests.OpenApi;

/// <summary>
/// Drives each route's failure modes (and its plain answers) through the real pipeline and checks
/// every answer's status and media type against the committed openapi/forecasthub-v1.json: a client
/// generated from the document must never meet an answer the document does not list.
/// </summary>
public sealed class DocumentedAnswersTests
{
    private const string Site = "/api/v1/sites/{siteId}";
    private const string NoSite = "/api/v1/sites/no-such-site";
    private const string Orchard = "/api/v1/sites/orchard-1";

    /// <summary>One request: the documented operation it belongs to, the concrete path, the caller and the body.</summary>
    private sealed record Call(string Method, string Template, string Path, Caller As, string? Body = null, string? ContentType = null, string? Accept = null);

    private enum Caller { Anonymous, Read, Ingest, Admin }

    [Fact]
    public async Task EveryAnswerHasAStatusAndMediaTypeTheDocumentLists()
    {
        var document = JsonNode.Parse(await File.ReadAllTextAsync(RepoFiles.PathOf("openapi", "forecasthub-v1.json")))!;
        await using var factory = new ApiFactory();
        using var admin = factory.CreateAdminClient();
        using var client = factory.CreateClient();
        using var created = await admin.CreateSite();
        Assert.Equal(System.Net.HttpStatusCode.Created, created.StatusCode);
        var keys = new Dictionary<Caller, string?>
        {
            [Caller.Anonymous] = null,
            [Caller.Read] = (await admin.IssueKey("read")).Secret,
            [Caller.Ingest] = (await admin.IssueKey("ingest", "orchard-1")).Secret,
            [Caller.Admin] = ApiFactory.AdminKey,
        };
        var readings = Some.HourlyReadings(48, ApiFactory.Now);
        var json = System.Text.Json.JsonSerializer.Serialize(Some.ReadingsBody(readings));

        var seen = new List<string>();
        var undocumented = new List<string>();
        foreach (var call in Calls(json, Some.Csv(readings)))
        {
            using var request = new HttpRequestMessage(new HttpMethod(call.Method), new Uri(call.Path, UriKind.Relative)).With(keys[call.As]);
            if (call.Body is not null)
            {
                request.Content = new StringContent(call.Body, Encoding.UTF8);
                request.Content.Headers.ContentType = MediaTypeHeaderValue.Parse(call.ContentType ?? "application/json");
            }
            if (call.Accept is not null)
            {
                request.Headers.Accept.ParseAdd(call.Accept);
            }
            using var response = await client.SendAsync(request);
            var status = ((int)response.StatusCode).ToString(System.Globalization.CultureInfo.InvariantCulture);
            var mediaType = response.Content.Headers.ContentType?.MediaType;
            var hasBody = (await response.Content.ReadAsByteArrayAsync()).Length > 0;
            seen.Add($"{call.Method} {call.Path} -> {status} {mediaType}");

            var operation = document["paths"]?[call.Template]?[call.Method.ToLowerInvariant()];
            Assert.True(operation is not null, $"{call.Method} {call.Template} is not in the document");
            var answer = operation!["responses"]?[status];
            if (answer is null)
            {
                undocumented.Add($"{call.Method} {call.Path} as {call.As} answered {status}, which {call.Method} {call.Template} does not list");
                continue;
            }
            var content = answer["content"]?.AsObject();
            if (hasBody && (mediaType is null || content is null || !content.ContainsKey(mediaType)))
            {
                undocumented.Add($"{call.Method} {call.Path} as {call.As} answered {status} as '{mediaType}', which the document lists " +
                    $"as [{string.Join(", ", content?.Select(c => c.Key) ?? [])}]");
            }
            else if (mediaType == "application/problem+json")
            {
                var type = JsonNode.Parse(await response.Content.ReadAsStringAsync())?["type"]?.GetValue<string>();
                var documented = (string?)content!["application/problem+json"]?["example"]?["type"];
                if (documented is null || type != documented || answer["description"]?.GetValue<string>().Contains(documented, StringComparison.Ordinal) != true)
                {
                    undocumented.Add($"{call.Method} {call.Path} as {call.As} answered {status} with problem type '{type}'; the document names '{documented}'");
                }
            }
        }

        Assert.True(undocumented.Count == 0, string.Join("\n", undocumented) + "\nAll answers:\n" + string.Join("\n", seen));
    }

    /// <summary>The site orchard-1 exists with no readings and no model; no-such-site does not exist.</summary>
    private static IEnumerable<Call> Calls(string readingsJson, string readingsCsv)
    {
        var big = "{\"name\":\"" + new string('x', 100 * 1024) + "\"}";
        var tooManyBytes = "{\"readings\":[" + string.Join(',', Enumerable.Repeat("{\"time\":\"2025-05-31T00:00:00Z\",\"value\":12.5}", 200_000)) + "]}";

        // Sites.
        yield return new("GET", "/api/v1/sites", "/api/v1/sites", Caller.Anonymous);
        yield return new("GET", "/api/v1/sites", "/api/v1/sites", Caller.Read);
        yield return new("GET", "/api/v1/sites", "/api/v1/sites?limit=0", Caller.Read);
        yield return new("POST", "/api/v1/sites", "/api/v1/sites", Caller.Read, "{\"id\":\"x-1\"}");
        yield return new("POST", "/api/v1/sites", "/api/v1/sites", Caller.Admin, "{\"id\":");
        yield return new("POST", "/api/v1/sites", "/api/v1/sites", Caller.Admin, "{\"id\":\"Not A Slug\"}");
        yield return new("POST", "/api/v1/sites", "/api/v1/sites", Caller.Admin, "id=x", "text/plain");
        yield return new("POST", "/api/v1/sites", "/api/v1/sites", Caller.Admin, big);
        yield return new("POST", "/api/v1/sites", "/api/v1/sites", Caller.Admin,
            """{"id":"orchard-1","name":"Again","timeZone":"Europe/Berlin","cadence":"hourly","latitude":52.5,"longitude":13.4}""");
        yield return new("GET", Site, Orchard, Caller.Read);
        yield return new("GET", Site, NoSite, Caller.Read);
        yield return new("PATCH", Site, NoSite, Caller.Admin, "{\"name\":\"x\"}");
        yield return new("PATCH", Site, Orchard, Caller.Admin, "{\"name\":", "application/json");
        yield return new("PATCH", Site, Orchard, Caller.Admin, "name=x", "text/plain");
        yield return new("PATCH", Site, Orchard, Caller.Read, "{\"name\":\"x\"}");
        yield return new("DELETE", Site, NoSite, Caller.Admin);
        yield return new("DELETE", Site, Orchard, Caller.Ingest);

        // Forecasts, chart, model, verification: orchard-1 has no model yet.
        foreach (var (template, path) in new[] { ("/forecast", "/forecast"), ("/forecast.svg", "/forecast.svg"), ("/verification", "/verification"), ("/model", "/model") })
        {
            yield return new("GET", Site + template, Orchard + path, Caller.Anonymous);
            yield return new("GET", Site + template, Orchard + path, Caller.Ingest);
            yield return new("GET", Site + template, NoSite + path, Caller.Read);
            yield return new("GET", Site + template, Orchard + path, Caller.Read);
        }
        yield return new("GET", Site + "/forecast", Orchard + "/forecast?steps=0", Caller.Read);
        yield return new("GET", Site + "/forecast", Orchard + "/forecast?unit=R", Caller.Read);
        yield return new("GET", Site + "/forecast", Orchard + "/forecast?format=csv", Caller.Read);
        yield return new("GET", Site + "/forecast", Orchard + "/forecast", Caller.Read, Accept: "text/csv");
        yield return new("GET", Site + "/forecast.svg", Orchard + "/forecast.svg?steps=0", Caller.Read);
        yield return new("GET", Site + "/model", Orchard + "/model?unit=R", Caller.Read);
        yield return new("GET", Site + "/model", Orchard + "/model?unit=F", Caller.Read);
        yield return new("POST", Site + "/model/refit", Orchard + "/model/refit?step=3", Caller.Admin);
        yield return new("POST", Site + "/model/refit", Orchard + "/model/refit", Caller.Read);
        yield return new("POST", Site + "/model/refit", NoSite + "/model/refit", Caller.Admin);
        yield return new("POST", Site + "/model/refit", Orchard + "/model/refit", Caller.Admin);
        yield return new("GET", Site + "/health", Orchard + "/health", Caller.Read);
        yield return new("GET", Site + "/health", NoSite + "/health", Caller.Read);
        yield return new("GET", "/api/v1/health/models", "/api/v1/health/models", Caller.Read);
        yield return new("GET", "/api/v1/health/models", "/api/v1/health/models", Caller.Anonymous);

        // Observations: posting.
        var observations = Site + "/observations";
        yield return new("POST", observations, Orchard + "/observations", Caller.Anonymous, readingsJson);
        yield return new("POST", observations, Orchard + "/observations", Caller.Read, readingsJson);
        yield return new("POST", observations, NoSite + "/observations", Caller.Admin, readingsJson);
        yield return new("POST", observations, Orchard + "/observations", Caller.Ingest, readingsJson, "text/plain");
        yield return new("POST", observations, Orchard + "/observations", Caller.Ingest, "{\"readings\":");
        yield return new("POST", observations, Orchard + "/observations?unit=R", Caller.Ingest, readingsJson);
        yield return new("POST", observations, Orchard + "/observations?onConflict=merge", Caller.Ingest, readingsJson);
        yield return new("POST", observations, Orchard + "/observations", Caller.Ingest, tooManyBytes);
        yield return new("POST", observations, Orchard + "/observations", Caller.Ingest, "{\"readings\":[{\"time\":\"2025-05-31T00:00:00Z\",\"value\":\"12\"}]}");
        yield return new("POST", observations, Orchard + "/observations", Caller.Ingest, readingsJson);
        yield return new("POST", observations, Orchard + "/observations?onConflict=replace", Caller.Ingest, readingsCsv, "text/csv");

        // Observations: reading back, raw and grid, JSON and CSV.
        yield return new("GET", observations, Orchard + "/observations", Caller.Anonymous);
        yield return new("GET", observations, Orchard + "/observations", Caller.Ingest);
        yield return new("GET", observations, NoSite + "/observations", Caller.Read);
        yield return new("GET", observations, Orchard + "/observations?from=yesterday", Caller.Read);
        yield return new("GET", observations, Orchard + "/observations?resolution=daily", Caller.Read);
        yield return new("GET", observations, Orchard + "/observations?limit=0", Caller.Read);
        yield return new("GET", observations, Orchard + "/observations", Caller.Read);
        yield return new("GET", observations, Orchard + "/observations?limit=5", Caller.Read);
        yield return new("GET", observations, Orchard + "/observations?resolution=grid", Caller.Read);
        yield return new("GET", observations, Orchard + "/observations?format=csv", Caller.Read);
        yield return new("GET", observations, Orchard + "/observations?resolution=grid&format=csv", Caller.Read);
        yield return new("GET", observations, Orchard + "/observations?resolution=grid&unit=K", Caller.Read);
        yield return new("GET", observations, Orchard + "/observations?unit=R", Caller.Read);
        yield return new("GET", observations, Orchard + "/observations?step=3", Caller.Read);
        yield return new("GET", observations, Orchard + "/observations", Caller.Read, Accept: "text/csv");

        // With readings stored a refit is attempted; too few for a model is still a documented answer.
        yield return new("POST", Site + "/model/refit", Orchard + "/model/refit", Caller.Admin);

        // Keys.
        yield return new("GET", "/api/v1/keys", "/api/v1/keys", Caller.Read);
        yield return new("GET", "/api/v1/keys", "/api/v1/keys?limit=0", Caller.Admin);
        yield return new("GET", "/api/v1/keys", "/api/v1/keys", Caller.Admin);
        yield return new("POST", "/api/v1/keys", "/api/v1/keys", Caller.Admin, "{\"scope\":\"everything\"}");
        yield return new("POST", "/api/v1/keys", "/api/v1/keys", Caller.Admin, "scope=read", "text/plain");
        yield return new("POST", "/api/v1/keys", "/api/v1/keys", Caller.Admin, big);
        yield return new("GET", "/api/v1/keys/{keyId}", "/api/v1/keys/no-such-key", Caller.Admin);
        yield return new("DELETE", "/api/v1/keys/{keyId}", "/api/v1/keys/no-such-key", Caller.Admin);
        yield return new("DELETE", "/api/v1/keys/{keyId}", "/api/v1/keys/no-such-key", Caller.Ingest);

        // Webhooks.
        yield return new("GET", "/api/v1/webhooks", "/api/v1/webhooks", Caller.Read);
        yield return new("GET", "/api/v1/webhooks", "/api/v1/webhooks?limit=0", Caller.Admin);
        yield return new("POST", "/api/v1/webhooks", "/api/v1/webhooks", Caller.Admin, "{\"url\":\"not a url\"}");
        yield return new("POST", "/api/v1/webhooks", "/api/v1/webhooks", Caller.Admin, "url=x", "text/plain");
        yield return new("POST", "/api/v1/webhooks", "/api/v1/webhooks", Caller.Admin, big);
        yield return new("GET", "/api/v1/webhooks/{webhookId}", "/api/v1/webhooks/no-such-hook", Caller.Admin);
        yield return new("DELETE", "/api/v1/webhooks/{webhookId}", "/api/v1/webhooks/no-such-hook", Caller.Admin);
        yield return new("GET", "/api/v1/webhooks/{webhookId}/deliveries", "/api/v1/webhooks/no-such-hook/deliveries", Caller.Admin);
        yield return new("GET", "/api/v1/webhooks/{webhookId}/deliveries", "/api/v1/webhooks/no-such-hook/deliveries?limit=0", Caller.Admin);

        // Alerts, health, metrics.
        yield return new("GET", "/api/v1/alerts", "/api/v1/alerts", Caller.Anonymous);
        yield return new("GET", "/api/v1/alerts", "/api/v1/alerts?limit=0", Caller.Read);
        yield return new("GET", "/api/v1/alerts", "/api/v1/alerts", Caller.Read);
        yield return new("GET", "/health/live", "/health/live", Caller.Anonymous);
        yield return new("GET", "/health/ready", "/health/ready", Caller.Anonymous);
        yield return new("GET", "/metrics", "/metrics", Caller.Anonymous);
        yield return new("GET", "/metrics", "/metrics", Caller.Ingest);
        yield return new("GET", "/metrics", "/metrics", Caller.Read);

        // Deleting the site last: its own answer is documented too.
        yield return new("DELETE", Site, Orchard, Caller.Admin);
    }
}
