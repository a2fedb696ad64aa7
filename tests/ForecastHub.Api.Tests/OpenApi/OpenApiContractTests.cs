using System.Text.Json;
using System.Text.Json.Nodes;
using ForecastHub.Api.Tests.Infrastructure;
using ForecastHub.Api.Tests.TestSupport;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Api.Tests.OpenApi;

/// <summary>
/// The committed openapi/forecasthub-v1.json is the contract. When an endpoint changes on purpose,
/// regenerate it with the command in <see cref="RegenerateCommand"/> and commit the diff.
/// </summary>
public sealed class OpenApiContractTests
{
    public const string UpdateVariable = "FORECASTHUB_UPDATE_OPENAPI";
    public const string RegenerateCommand =
        UpdateVariable + "=1 dotnet test tests/ForecastHub.Api.Tests --filter FullyQualifiedName~OpenApiContractTests";

    private static readonly string CommittedPath = RepoFiles.PathOf("openapi", "forecasthub-v1.json");

    [Fact]
    public async Task ServedDocumentEqualsTheCommittedContract()
    {
        var served = Canonical(await ServedDocument());

        if (Environment.GetEnvironmentVariable(UpdateVariable) == "1")
        {
            await File.WriteAllTextAsync(CommittedPath, served);
        }
        var committed = File.Exists(CommittedPath) ? await File.ReadAllTextAsync(CommittedPath) : "";

        Assert.True(committed == served,
            $"The served OpenAPI document differs from openapi/forecasthub-v1.json{FirstDifference(committed, served)}. " +
            $"If the change is intended, regenerate the file and commit it: {RegenerateCommand}");
    }

    [Fact]
    public async Task EveryOperationHasANameASummaryAndProblemAnswers()
    {
        var document = JsonNode.Parse(await ServedDocument())!;
        var operations = Operations(document).ToList();

        Assert.NotEmpty(operations);
        var ids = new HashSet<string>(StringComparer.Ordinal);
        foreach (var (name, operation) in operations)
        {
            var id = (string?)operation["operationId"];
            Assert.False(string.IsNullOrEmpty(id), $"{name} has no name: add .WithName(...)");
            Assert.True(ids.Add(id!), $"{name} repeats the operation name {id}");
            Assert.False(string.IsNullOrEmpty((string?)operation["summary"]), $"{name} has no summary: add .WithSummary(...)");
            foreach (var parameter in operation["parameters"]?.AsArray() ?? [])
            {
                Assert.False(string.IsNullOrEmpty((string?)parameter!["description"]), $"{name}: parameter '{parameter["name"]}' has no description: add a <param> XML doc");
            }
            var responses = operation["responses"]!.AsObject();
            Assert.Contains(responses, r => r.Key.StartsWith('2'));
            foreach (var (code, response) in responses.Where(r => r.Key[0] is '4' or '5'))
            {
                Assert.True(response!["content"]?["application/problem+json"] is not null, $"{name} answers {code} without a problem+json schema");
            }
            if (operation["security"] is JsonArray { Count: > 0 })
            {
                Assert.True(responses.ContainsKey("401") && responses.ContainsKey("403"), $"{name} needs a key but does not list 401 and 403");
            }
        }
    }

    [Theory]
    [InlineData("GET /api/v1/sites/{siteId}/forecast", "409")]
    [InlineData("GET /api/v1/sites/{siteId}/forecast.svg", "409")]
    [InlineData("GET /api/v1/sites/{siteId}/verification", "409")]
    [InlineData("POST /api/v1/sites/{siteId}/model/refit", "409")]
    [InlineData("POST /api/v1/sites/{siteId}/model/refit", "422")]
    [InlineData("POST /api/v1/sites/{siteId}/observations", "422")]
    [InlineData("DELETE /api/v1/keys/{keyId}", "409")]
    public async Task DocumentListsTheStatusesTheEndpointsAnswer(string operation, string status)
    {
        var document = JsonNode.Parse(await ServedDocument())!;

        var responses = Operations(document).Single(o => o.Name == operation).Operation["responses"]!.AsObject();

        Assert.True(responses.ContainsKey(status), $"{operation} does not list {status}; it lists {string.Join(", ", responses.Select(r => r.Key))}");
    }

    [Fact]
    public async Task ConflictAndUnprocessableAnswersSayWhatCausesThemOnTheirRoute()
    {
        var document = JsonNode.Parse(await ServedDocument())!;

        var answers = Operations(document)
            .SelectMany(o => o.Operation["responses"]!.AsObject().Where(r => r.Key is "409" or "422").Select(r => (o.Name, Status: r.Key, Description: (string?)r.Value!["description"])))
            .ToList();

        Assert.True(answers.Count >= 10, $"expected the 409 and 422 answers of the document, found {answers.Count}");
        foreach (var (operation, status, description) in answers)
        {
            // The bare reason phrase says nothing a client can act on; a <response code="..."> doc on the handler says what causes it.
            Assert.False(description is null || description.StartsWith("Conflict.", StringComparison.Ordinal)
                || description.StartsWith("Unprocessable Content.", StringComparison.Ordinal),
                $"{operation} documents {status} without its cause: '{description}'");
            Assert.DoesNotContain("\n", description, StringComparison.Ordinal);
        }
    }

    [Theory]
    [InlineData("GET /api/v1/sites/{siteId}/forecast", "409", "no fitted model")]
    [InlineData("GET /api/v1/sites/{siteId}/forecast", "409", "warming up")]
    [InlineData("GET /api/v1/sites/{siteId}/forecast.svg", "409", "no fitted model")]
    [InlineData("GET /api/v1/sites/{siteId}/verification", "409", "no fitted model")]
    [InlineData("POST /api/v1/sites/{siteId}/model/refit", "409", "fewer observed grid points than a fit needs")]
    [InlineData("POST /api/v1/sites/{siteId}/model/refit", "422", "The fit failed")]
    [InlineData("POST /api/v1/sites/{siteId}/observations", "422", "`rejected`, each row's index, line, time and reason")]
    [InlineData("POST /api/v1/sites/{siteId}/observations", "422", "field `unit`")]
    [InlineData("DELETE /api/v1/keys/{keyId}", "409", "last active admin key")]
    [InlineData("POST /api/v1/sites", "409", "already exists")]
    public async Task ConflictAndUnprocessableDescriptionsNameTheHandlersCauses(string operation, string status, string cause)
    {
        var document = JsonNode.Parse(await ServedDocument())!;

        var description = (string?)Operations(document).Single(o => o.Name == operation).Operation["responses"]![status]!["description"];

        Assert.Contains(cause, description, StringComparison.Ordinal);
    }

    [Fact]
    public async Task QueryParametersAreLowerCaseAndTypedAsTheHandlersParseThem()
    {
        var document = JsonNode.Parse(await ServedDocument())!;
        // Opaque cursors and CSV column names (a header name or a position) are text.
        string[] text = ["after", "before", "cursor", "timeColumn", "valueColumn", "unitColumn"];

        var parameters = Operations(document)
            .SelectMany(o => (o.Operation["parameters"]?.AsArray() ?? []).Where(p => (string?)p!["in"] == "query").Select(p => (o.Name, Parameter: p!)))
            .ToList();

        Assert.NotEmpty(parameters);
        foreach (var (operation, parameter) in parameters)
        {
            var name = (string)parameter["name"]!;
            var schema = parameter["schema"]!;
            Assert.True(char.IsLower(name[0]), $"{operation}: query parameter '{name}' is not spelt as clients send it");
            var typed = (string?)schema["type"] != "string" || schema["format"] is not null || schema["enum"] is not null;
            Assert.True(typed || text.Contains(name), $"{operation}: query parameter '{name}' is a plain string");
        }
        var limit = parameters.Single(p => p.Name == "GET /api/v1/sites/{siteId}/observations" && (string?)p.Parameter["name"] == "limit").Parameter["schema"]!;
        Assert.Equal(("integer", 1, 10_000, 1_000), ((string?)limit["type"], (int)limit["minimum"]!, (int)limit["maximum"]!, (int)limit["default"]!));
    }

    [Fact]
    public async Task ContractTypesCarryTheirXmlDocs()
    {
        var document = JsonNode.Parse(await ServedDocument())!;

        var page = document["components"]!["schemas"]!["ObservationPage"]!;

        Assert.StartsWith("One page of raw readings", (string?)page["description"], StringComparison.Ordinal);
    }

    [Fact]
    public async Task DocumentDescribesEveryApiEndpointAndTheBearerScheme()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateClient();
        var document = JsonNode.Parse(await client.GetStringAsync(new Uri("/swagger/v1/swagger.json", UriKind.Relative)))!;
        var described = Operations(document).Select(o => o.Name).ToHashSet(StringComparer.Ordinal);

        var api = factory.Services.GetRequiredService<EndpointDataSource>().Endpoints.OfType<RouteEndpoint>()
            .Where(e => e.RoutePattern.RawText?.StartsWith("/api/", StringComparison.Ordinal) == true)
            .SelectMany(e => e.Metadata.GetMetadata<HttpMethodMetadata>()!.HttpMethods.Select(m => $"{m} /{e.RoutePattern.RawText!.Trim('/')}"))
            .ToList();

        Assert.NotEmpty(api);
        Assert.Subset(described, api.ToHashSet(StringComparer.Ordinal));
        var bearer = document["components"]!["securitySchemes"]!["Bearer"]!;
        Assert.Equal("http", (string?)bearer["type"]);
        Assert.Equal("bearer", (string?)bearer["scheme"]);
    }

    [Fact]
    public async Task SwaggerUiIsServedAtSwagger()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateClient();

        var page = await client.GetStringAsync(new Uri("/swagger/index.html", UriKind.Relative));
        var config = await client.GetStringAsync(new Uri("/swagger/index.js", UriKind.Relative));

        Assert.Contains("swagger-ui", page, StringComparison.Ordinal);
        Assert.Contains("/swagger/v1/swagger.json", config, StringComparison.Ordinal);
    }

    private static async Task<string> ServedDocument()
    {
        await using var factory = new ApiFactory();
        using var client = factory.CreateClient();
        return await client.GetStringAsync(new Uri("/swagger/v1/swagger.json", UriKind.Relative));
    }

    private static IEnumerable<(string Name, JsonObject Operation)> Operations(JsonNode document) =>
        document["paths"]!.AsObject().SelectMany(path => path.Value!.AsObject()
            .Where(op => op.Value is JsonObject && op.Key is "get" or "post" or "put" or "patch" or "delete")
            .Select(op => ($"{op.Key.ToUpperInvariant()} {path.Key.TrimEnd('/')}", op.Value!.AsObject())));

    /// <summary>Indented with LF line ends and a final newline, so the file diffs well in review.</summary>
    private static string Canonical(string json) =>
        JsonNode.Parse(json)!.ToJsonString(new JsonSerializerOptions { WriteIndented = true }).Replace("\r\n", "\n", StringComparison.Ordinal) + "\n";

    private static string FirstDifference(string committed, string served)
    {
        if (committed.Length == 0)
        {
            return " (the committed file is missing or empty)";
        }
        var a = committed.Split('\n');
        var b = served.Split('\n');
        for (var i = 0; i < Math.Max(a.Length, b.Length); i++)
        {
            var left = i < a.Length ? a[i] : "<end>";
            var right = i < b.Length ? b[i] : "<end>";
            if (left != right)
            {
                return $" from line {i + 1}: committed '{left.Trim()}', served '{right.Trim()}'";
            }
        }
        return "";
    }
}
