using System.Globalization;
using System.Security.Claims;
using System.Text;
using ForecastHub.Api.Auth;
using ForecastHub.Api.Hosting;
using ForecastHub.Api.Metrics;
using ForecastHub.Api.OpenApi;
using ForecastHub.Api.Problems;
using ForecastHub.Api.Sites;
using ForecastHub.Core.Grid;
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
            .RequireAuthorization(AuthPolicies.Read)
            .WithSuccessFormats(csv: true, typeof(ObservationPage), typeof(GridPage));
        return group;
    }

    /// <response code="422">Nothing was stored. Either every reading was rejected (it failed validation, or a different value is stored for its
    /// time): the problem carries the counts and <c>rejected</c>, each row's index, line, time and reason. Or the batch looks sent in another unit than it says (read as C it is implausible for the site, read as F or K it
    /// is not): it is refused whole and the problem names the field <c>unit</c>.</response>
    public static async Task<Results<Ok<ObservationsAnswer>, ProblemHttpResult>> Post(
        string siteId, HttpRequest request, [AsParameters] IngestQuery query,
        IReadingStore readings, ISiteStore sites, ServiceMetrics metrics, TimeProvider clock, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
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
        return await IngestAsync(siteId, body, isJson, query, request.HttpContext.User, readings, sites, metrics, clock, cancellationToken).ConfigureAwait(false);
    }

    /// <summary>Everything a post does after its body has arrived and its key was allowed to write the
    /// site (<paramref name="caller"/>): the one ingest path of HTTP and MQTT.</summary>
    public static async Task<Results<Ok<ObservationsAnswer>, ProblemHttpResult>> IngestAsync(
        string siteId, byte[] body, bool isJson, IngestQuery query, ClaimsPrincipal caller,
        IReadingStore readings, ISiteStore sites, ServiceMetrics metrics, TimeProvider clock, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(query);
        ArgumentNullException.ThrowIfNull(caller);
        ArgumentNullException.ThrowIfNull(sites);
        var (unit, onConflict) = (query.Unit, query.OnConflict);
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
        var (layout, layoutField, layoutError) = CsvLayout.From(query.TimeColumn, query.ValueColumn, query.UnitColumn, query.Separator, query.DecimalMark);
        if (layout is null)
        {
            return ApiProblems.BadRequest(layoutField!, layoutError!);
        }
        if (isJson && query.NamesCsvLayout)
        {
            return ApiProblems.BadRequest("timeColumn", "timeColumn, valueColumn, unitColumn, separator and decimal describe a text/csv body; this body is JSON.");
        }
        var site = await sites.GetAsync(siteId, cancellationToken).ConfigureAwait(false);
        if (site is null)
        {
            return SitesEndpoints.NoSuchSite(siteId);
        }
        var localZone = query.LocalTimes == true ? GridBuilder.FindZone(site.TimeZone) : null;
        var now = clock.GetUtcNow();
        var (batch, problem) = isJson
            ? (localZone is null ? ReadJson(body, unit, now) : Validate(ParseJson(body), unit, now, localZone))
            : Validate(ParseCsv(body, layout), unit, now, localZone);
        if (problem is not null)
        {
            return problem;
        }
        if (UnitPlausibility.Check(batch!, site.Quality) is { } unitProblem)
        {
            return TypedResults.Problem(statusCode: StatusCodes.Status422UnprocessableEntity, title: "The unit looks wrong",
                detail: unitProblem, extensions: new Dictionary<string, object?> { ["field"] = "unit" });
        }
        metrics.Readings.Inc(batch!.Rejected.Count, "rejected");
        var policy = onConflict == "replace" ? ConflictPolicy.Replace : ConflictPolicy.Reject;
        // The write carries the key the batch was checked against: a site deleted (and perhaps created again) since gets nothing.
        var result = await readings.IngestAsync(siteId, batch.Valid, policy, clock.GetUtcNow(), site.Key, cancellationToken).ConfigureAwait(false);
        if (result is null)
        {
            return ApiProblems.NotFound($"Site '{siteId}' was deleted while this request was being stored; nothing was stored. A site created again under the id is a new site: send the readings again if they belong to it.");
        }
        // A key that may not read the series learns only that a different value is stored.
        var mayRead = caller.HasClaim(ApiKeyScopes.ScopeClaim, ApiKeyScopes.Admin)
            || caller.HasClaim(ApiKeyScopes.ScopeClaim, ApiKeyScopes.Read);
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

    private static (ReadingBatch? Batch, ProblemHttpResult? Problem) Validate(
        (List<RawReading>? Rows, string? Unit, ProblemHttpResult? Problem) parsed, string? unit, DateTimeOffset now, TimeZoneInfo? localZone = null)
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
        var (valid, rejected, impossible) = ReadingValidation.Validate(rows, bodyUnit ?? unit ?? TemperatureUnits.Celsius, now, localZone);
        return (new ReadingBatch(rows.Count, valid, rejected, i => rows[i].Time, i => rows[i].Line, impossible), null);
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

    private static (List<RawReading>? Rows, string? Unit, ProblemHttpResult? Problem) ParseCsv(byte[] body, CsvLayout layout)
    {
        var (rows, error, tooMany) = CsvReadings.Parse(body, MaxReadings, layout);
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
