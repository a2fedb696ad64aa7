using System.Globalization;
using System.Text;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Hosting;
using ForecastHub.Api.Metrics;
using ForecastHub.Api.Problems;
using ForecastHub.Api.Sites;
using ForecastHub.Core.Quality;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.AspNetCore.Mvc;

namespace ForecastHub.Api.Observations;

public static class ObservationsEndpoints
{
    /// <summary>DESIGN section 5: at most 50,000 readings or 8 MiB per request.</summary>
    public const int MaxReadings = 50_000;
    public const int MaxBodyBytes = 8 * 1024 * 1024;

    public static RouteGroupBuilder MapObservations(this IEndpointRouteBuilder routes)
    {
        // Policies per endpoint, not on the group: an ingest key may post but not read.
        var group = routes.MapGroup("/sites/{siteId}/observations").WithTags("Observations");
        group.MapPost("/", Post).WithName("PostObservations")
            .WithSummary("Store readings (JSON or text/csv); answers per-row outcomes. Retrying a batch is safe.")
            .RequireAuthorization(AuthPolicies.Ingest)
            .Accepts<ObservationsBody>("application/json", "text/csv")
            .WithRequestBodyLimit(MaxBodyBytes)
            .ProducesProblem(StatusCodes.Status422UnprocessableEntity);
        group.MapGet("/", ObservationQueries.Get).WithName("GetObservations")
            .WithSummary("Stored readings (resolution=raw) or the site's regular grid (resolution=grid), JSON or CSV, paged by 'next'.")
            .RequireAuthorization(AuthPolicies.Read);
        return group;
    }

    public static async Task<Results<Ok<ObservationsAnswer>, ProblemHttpResult>> Post(
        string siteId, HttpRequest request, [FromQuery] string? unit, [FromQuery] string? onConflict,
        IReadingStore readings, ServiceMetrics metrics, TimeProvider clock, CancellationToken cancellationToken)
    {
        if (!SiteRules.IsValidSiteId(siteId))
        {
            return SitesEndpoints.NoSuchSite(siteId);
        }
        if (unit is not null && !TemperatureUnits.IsKnown(unit))
        {
            return ApiProblems.BadRequest("unit", $"?unit='{IsoTime.Clip(unit)}' is not known: {TemperatureUnits.UnknownUnitMessage}");
        }
        if (onConflict is not (null or "reject" or "replace"))
        {
            return ApiProblems.BadRequest("onConflict", "onConflict must be 'reject' (the default) or 'replace'.");
        }
        var isJson = RequestBody.IsJson(request);
        if (!isJson && !RequestBody.IsCsv(request))
        {
            return ApiProblems.UnsupportedMediaType("Send readings as 'application/json' or 'text/csv'.");
        }
        var body = await RequestBody.ReadAsync(request, MaxBodyBytes, cancellationToken).ConfigureAwait(false);
        if (body is null)
        {
            return ApiProblems.TooLarge($"The body is larger than {MaxBodyBytes / (1024 * 1024)} MiB; send at most {MaxReadings} readings per request.");
        }
        var now = clock.GetUtcNow();
        var (batch, problem) = isJson ? ReadJson(body, unit, now) : ReadCsv(body, unit, now);
        if (problem is not null)
        {
            return problem;
        }
        metrics.Readings.Inc(batch!.Rejected.Count, "rejected");
        var policy = onConflict == "replace" ? ConflictPolicy.Replace : ConflictPolicy.Reject;
        var result = await readings.IngestAsync(siteId, batch.Valid, policy, clock.GetUtcNow(), cancellationToken).ConfigureAwait(false);
        if (result is null)
        {
            return SitesEndpoints.NoSuchSite(siteId);
        }
        // A key that may not read the series learns only that a different value is stored.
        var mayRead = request.HttpContext.User.HasClaim(ApiKeyScopes.ScopeClaim, ApiKeyScopes.Admin)
            || request.HttpContext.User.HasClaim(ApiKeyScopes.ScopeClaim, ApiKeyScopes.Read);
        var answer = Summarise(batch, result, mayRead);
        if (answer.Accepted + answer.Duplicates + answer.Replaced == 0)
        {
            return TypedResults.Problem(statusCode: StatusCodes.Status422UnprocessableEntity, title: "No reading stored",
                detail: $"Every one of the {batch.Count} readings was rejected; see 'rejected' for each row's reason.",
                extensions: new Dictionary<string, object?>
                {
                    ["accepted"] = 0, ["duplicates"] = 0, ["replaced"] = 0, ["flagged"] = 0, ["rejected"] = answer.Rejected,
                });
        }
        return TypedResults.Ok(answer);
    }

    private static ObservationsAnswer Summarise(ReadingBatch batch, IngestResult result, bool showStoredValues)
    {
        var (valid, rejected) = (batch.Valid, batch.Rejected);
        int accepted = 0, duplicates = 0, replaced = 0, flagged = 0;
        for (var i = 0; i < valid.Count; i++)
        {
            var outcome = result.Outcomes[i];
            switch (outcome.Kind)
            {
                case ReadingOutcomeKind.Accepted:
                    accepted++;
                    break;
                case ReadingOutcomeKind.Duplicate:
                    duplicates++;
                    break;
                case ReadingOutcomeKind.Replaced:
                    replaced++;
                    break;
                case ReadingOutcomeKind.Conflict:
                    var index = valid[i].Index;
                    var stored = showStoredValues
                        ? string.Create(CultureInfo.InvariantCulture, $"{outcome.StoredValueC:0.###} C is")
                        : "a different value is";
                    rejected.Add(new RejectedReading(index, batch.Line(index), batch.TimeText(index),
                        $"conflict: {stored} already stored for this time; send ?onConflict=replace to overwrite it."));
                    continue;
            }
            if (outcome.Kind != ReadingOutcomeKind.Duplicate && outcome.Flags != QualityFlags.None)
            {
                flagged++;
            }
        }
        rejected.Sort((a, b) => a.Index.CompareTo(b.Index));
        return new ObservationsAnswer(accepted, duplicates, replaced, flagged, rejected);
    }

    // The fast reader for the usual JSON body; the strict parser for CSV and for every other JSON body.
    private static (ReadingBatch? Batch, ProblemHttpResult? Problem) ReadJson(byte[] body, string? queryUnit, DateTimeOffset now) =>
        RequestBody.InvalidUtf8At(body) is null && Utf8JsonReadings.TryRead(body, queryUnit, now, MaxReadings) is { } batch
            ? (batch, null)
            : ReadJsonStrict(body, queryUnit, now);

    internal static (ReadingBatch? Batch, ProblemHttpResult? Problem) ReadJsonStrict(byte[] body, string? queryUnit, DateTimeOffset now) =>
        Validate(ParseJson(body), queryUnit, now);

    private static (ReadingBatch? Batch, ProblemHttpResult? Problem) ReadCsv(byte[] body, string? queryUnit, DateTimeOffset now) =>
        Validate(ParseCsv(body), queryUnit, now);

    private static (ReadingBatch? Batch, ProblemHttpResult? Problem) Validate(
        (List<RawReading>? Rows, string? Unit, ProblemHttpResult? Problem) parsed, string? unit, DateTimeOffset now)
    {
        var (rows, bodyUnit, problem) = parsed;
        if (problem is not null)
        {
            return (null, problem);
        }
        if (bodyUnit is not null && !TemperatureUnits.IsKnown(bodyUnit))
        {
            return (null, ApiProblems.BadRequest("unit", $"unit '{IsoTime.Clip(bodyUnit)}' is not known: {TemperatureUnits.UnknownUnitMessage}"));
        }
        if (bodyUnit is not null && unit is not null && bodyUnit != unit)
        {
            return (null, ApiProblems.BadRequest("unit", $"The body says unit '{bodyUnit}' but ?unit= says '{unit}'; send one."));
        }
        if (rows!.Count == 0)
        {
            return (null, ApiProblems.BadRequest("readings", "The request holds no readings."));
        }
        var (valid, rejected) = ReadingValidation.Validate(rows, bodyUnit ?? unit ?? TemperatureUnits.Celsius, now);
        return (new ReadingBatch(rows.Count, valid, rejected, i => rows[i].Time, i => rows[i].Line), null);
    }

    private static (List<RawReading>? Rows, string? Unit, ProblemHttpResult? Problem) ParseJson(byte[] body)
    {
        using var document = RequestBody.ParseJson(body, out var error);
        if (document is null)
        {
            return (null, null, ApiProblems.BadRequest("body", error!));
        }
        var (rows, unit, field, parseError, tooMany) = JsonReadings.Parse(document.RootElement, MaxReadings);
        if (rows is null)
        {
            return (null, null, tooMany ? ApiProblems.TooLarge(parseError!) : ApiProblems.BadRequest(field!, parseError!));
        }
        return (rows, unit, null);
    }

    private static (List<RawReading>? Rows, string? Unit, ProblemHttpResult? Problem) ParseCsv(byte[] body)
    {
        var (rows, error, tooMany) = CsvReadings.Parse(body, MaxReadings);
        if (rows is null)
        {
            return (null, null, tooMany ? ApiProblems.TooLarge(error!) : ApiProblems.BadRequest("body", error!));
        }
        return (rows, null, null);
    }

    internal static string CsvField(string text) =>
        text.AsSpan().IndexOfAny(",\"\r\n") < 0 ? text : $"\"{text.Replace("\"", "\"\"", StringComparison.Ordinal)}\"";

    internal static StringBuilder CsvLine(this StringBuilder csv, params string[] fields) =>
        csv.AppendJoin(',', fields.Select(CsvField)).Append("\r\n");
}
