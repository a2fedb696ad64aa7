using ForecastHub.Api.Tests.TestSupport;
using Newtonsoft.Json.Linq;
using NJsonSchema;

namespace ForecastHub.Api.Tests.OpenApi;

/// <summary>
/// The committed openapi/forecasthub-v1.json shows a success example for every operation (its request
/// body and its answer), and every JSON example is valid against the schema beside it: checked with
/// NJsonSchema 11.6.2's validator (OpenAPI 3 nullability), and completely filled in: every property the
/// schema does not mark nullable is present, at every depth.
/// </summary>
public sealed class OperationExamplesTests
{
    private const string Json = "application/json";

    /// <summary>One example in the document: where it is, its media type, its schema and its value.</summary>
    private sealed record Example(string Where, string MediaType, JsonSchema? Schema, object Value);

    [Fact]
    public async Task EveryOperationHasASuccessExampleForItsBodyAndItsAnswer()
    {
        var document = await Document();
        var missing = new List<string>();

        foreach (var operation in document.Operations)
        {
            var name = $"{operation.Method.ToUpperInvariant()} {operation.Path}";
            if (operation.Operation.RequestBody is { } body && !body.Content.Any(c => HasExample(c.Value)))
            {
                missing.Add($"{name}: request body");
            }
            var success = operation.Operation.ActualResponses.Where(r => r.Key.StartsWith('2')).ToList();
            Assert.True(success.Count > 0, $"{name} has no success answer");
            foreach (var (status, response) in success.Where(r => r.Value.Content.Count > 0))
            {
                // The first media type is the main one; every JSON answer has its example too.
                var needed = response.Content.Take(1).Concat(response.Content.Where(c => c.Key == Json)).Distinct();
                missing.AddRange(needed.Where(c => !HasExample(c.Value)).Select(c => $"{name}: {status} {c.Key}"));
            }
        }

        Assert.True(missing.Count == 0, "No success example for: " + string.Join("; ", missing));
    }

    [Fact]
    public async Task EveryJsonExampleIsValidAgainstItsOwnSchema()
    {
        var examples = Examples(await Document()).Where(e => e.MediaType == Json).ToList();
        var problems = new List<string>();

        Assert.True(examples.Count >= 25, $"expected the JSON examples of every operation, found {examples.Count}");
        foreach (var example in examples)
        {
            Assert.True(example.Schema is not null, $"{example.Where} has an example but no schema");
            var value = JToken.FromObject(example.Value);
            problems.AddRange(example.Schema!.Validate(value, SchemaType.OpenApi3).Select(e => $"{example.Where}: {e.Kind} at {e.Path}"));
            problems.AddRange(Incomplete(example.Schema!, value, example.Where));
        }

        Assert.True(problems.Count == 0, string.Join("\n", problems));
    }

    [Fact]
    public async Task ExamplesCheckCatchesAnUnknownFieldAndAMissingOne()
    {
        var site = Examples(await Document()).First(e => e.Where.StartsWith("GET /api/v1/sites/{siteId} 200", StringComparison.Ordinal));
        var renamed = (JObject)JToken.FromObject(site.Value);
        renamed["timezone"] = renamed["timeZone"];
        renamed.Remove("timeZone");

        Assert.NotEmpty(site.Schema!.Validate(renamed, SchemaType.OpenApi3));
        Assert.Contains(Incomplete(site.Schema!, renamed, "site"), p => p.Contains("timeZone", StringComparison.Ordinal));
    }

    [Fact]
    public async Task ExamplesAreOfTheDemoSiteWithIsoTimesAndPlausibleTemperatures()
    {
        var forecast = (JObject)JToken.FromObject(Examples(await Document())
            .Single(e => e.Where == "GET /api/v1/sites/{siteId}/forecast 200 application/json").Value);

        Assert.Equal("ambrel-low", (string?)forecast["siteId"]);
        Assert.Matches(@"^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(Z|[+-]\d{2}:\d{2})$", forecast["origin"]!.ToString(Newtonsoft.Json.Formatting.None).Trim('"'));
        foreach (var step in forecast["steps"]!)
        {
            // A night in a temperate orchard: within the site's own quality limits of the example (-25..40 C), spread positive.
            Assert.InRange((double)step["mean"]!, -25, 40);
            Assert.True((double)step["sd"]! > 0);
            Assert.All(step["intervals"]!, i => Assert.True((double)i["lower"]! < (double)step["mean"]! && (double)step["mean"]! < (double)i["upper"]!));
        }
    }

    private static bool HasExample(NSwag.OpenApiMediaType media) => media.Example is not null || media.Examples.Count > 0;

    private static IEnumerable<Example> Examples(NSwag.OpenApiDocument document)
    {
        foreach (var operation in document.Operations)
        {
            var name = $"{operation.Method.ToUpperInvariant()} {operation.Path}";
            var contents = (operation.Operation.RequestBody?.Content ?? new Dictionary<string, NSwag.OpenApiMediaType>())
                .Select(c => (Where: $"{name} body {c.Key}", c.Key, c.Value))
                .Concat(operation.Operation.ActualResponses.Where(r => r.Key.StartsWith('2'))
                    .SelectMany(r => r.Value.Content.Select(c => (Where: $"{name} {r.Key} {c.Key}", c.Key, c.Value))));
            foreach (var (where, mediaType, media) in contents)
            {
                if (media.Example is { } example)
                {
                    yield return new Example(where, mediaType, media.Schema?.ActualSchema, example);
                }
                foreach (var (key, named) in media.Examples)
                {
                    // A named example is of one of the oneOf's schemas.
                    var schema = media.Schema?.ActualSchema;
                    var of = schema?.OneOf.Select(s => s.ActualSchema).FirstOrDefault(s => s.Validate(JToken.FromObject(named.Value), SchemaType.OpenApi3).Count == 0);
                    yield return new Example($"{where} ({key})", mediaType, of ?? schema, named.Value);
                }
            }
        }
    }

    /// <summary>Every property the schema does not mark nullable is present, in objects at every depth (array items included).</summary>
    private static IEnumerable<string> Incomplete(JsonSchema schema, JToken value, string where)
    {
        var actual = schema.ActualSchema;
        if (value is JObject obj)
        {
            foreach (var (name, property) in actual.ActualProperties)
            {
                if (obj[name] is { } child)
                {
                    foreach (var problem in Incomplete(property, child, $"{where}.{name}"))
                    {
                        yield return problem;
                    }
                }
                else if (!property.IsNullable(SchemaType.OpenApi3))
                {
                    yield return $"{where}: no '{name}'";
                }
            }
        }
        else if (value is JArray array && actual.Item is { } item)
        {
            foreach (var (element, i) in array.Select((e, i) => (e, i)))
            {
                foreach (var problem in Incomplete(item, element, $"{where}[{i}]"))
                {
                    yield return problem;
                }
            }
        }
    }

    private static Task<NSwag.OpenApiDocument> Document() =>
        NSwag.OpenApiDocument.FromFileAsync(RepoFiles.PathOf("openapi", "forecasthub-v1.json"));
}
