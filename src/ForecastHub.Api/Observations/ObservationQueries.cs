using System.Globalization;
using System.Text;
using ForecastHub.Api.Problems;
using ForecastHub.Api.Sites;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Settings;
using ForecastHub.Core.Quality;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.Api.OpenApi;
using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.AspNetCore.Mvc;
using Microsoft.AspNetCore.WebUtilities;

namespace ForecastHub.Api.Observations;

/// <summary>Query of <c>GET .../observations</c>.</summary>
/// <param name="From">Start of the time range, inclusive: an ISO 8601 instant with an offset; absent: from the first reading.</param>
/// <param name="To">End of the time range, exclusive: an ISO 8601 instant with an offset; absent: to the last reading.</param>
/// <param name="Resolution">raw: the stored readings; grid: the site's regular grid (hourly means or daily values, short gaps interpolated).</param>
/// <param name="Limit">Most readings or grid steps on this page.</param>
/// <param name="Cursor">Where the page starts: taken from the previous page's <c>next</c> link.</param>
/// <param name="Format">json or csv; <c>Accept: text/csv</c> also asks for CSV.</param>
/// <param name="Unit">Temperature unit of the values (stored and grid): C (default), F or K; original values keep the unit they were sent in.</param>
public sealed record ObservationQuery(
    [FromQuery(Name = "from"), QueryValue(QueryValueKind.DateTime)] string? From,
    [FromQuery(Name = "to"), QueryValue(QueryValueKind.DateTime)] string? To,
    [FromQuery(Name = "resolution"), QueryValue(QueryValueKind.Choice, Values = ["raw", "grid"], Default = "raw")] string? Resolution,
    [FromQuery(Name = "limit"), QueryValue(QueryValueKind.WholeNumber, Minimum = 1, Maximum = ObservationQueries.MaxLimit, Default = ObservationQueries.DefaultLimit)] string? Limit,
    [FromQuery(Name = "cursor")] string? Cursor,
    [FromQuery(Name = "format"), QueryValue(QueryValueKind.Choice, Values = ["json", "csv"], Default = "json")] string? Format,
    [FromQuery(Name = "unit"), QueryValue(QueryValueKind.Choice, Values = [TemperatureUnits.Celsius, TemperatureUnits.Fahrenheit, TemperatureUnits.Kelvin], Default = TemperatureUnits.Celsius)] string? Unit);

public static class ObservationQueries
{
    public const int DefaultLimit = 1000;
    public const int MaxLimit = 10_000;

    /// <summary>Upper bound on raw readings read to build one grid page.</summary>
    private const int MaxReadingsPerGridPage = 2_000_000;

    private sealed record Window(long FromMs, long ToMs, long? Cursor, int Limit, bool Csv, string Unit)
    {
        /// <summary>A value stored in degrees C, in the answer's unit.</summary>
        public double InUnit(double valueC) => TemperatureUnits.FromCelsius(valueC, Unit);
    }

    public static async Task<Results<Ok<ObservationPage>, Ok<GridPage>, ContentHttpResult, ProblemHttpResult>> Get(
        string siteId, [AsParameters] ObservationQuery query, HttpContext context, ISiteStore sites, IReadingStore readings,
        CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(query);
        ArgumentNullException.ThrowIfNull(context);
        var (window, problem) = ParseWindow(query, context.Request);
        if (problem is not null)
        {
            return problem;
        }
        var site = SiteRules.IsValidSiteId(siteId) ? await sites.GetAsync(siteId, cancellationToken).ConfigureAwait(false) : null;
        if (site is null)
        {
            return SitesEndpoints.NoSuchSite(siteId);
        }
        return query.Resolution is null or "raw"
            ? await Raw(site, window!, context, readings, cancellationToken).ConfigureAwait(false)
            : await Grid(site, window!, context, readings, cancellationToken).ConfigureAwait(false);
    }

    private static (Window? Window, ProblemHttpResult? Problem) ParseWindow(ObservationQuery query, HttpRequest request)
    {
        if (Http.QueryParameters.RejectUnknown(request, "from", "to", "resolution", "limit", "cursor", "format", "unit") is { } unknown)
        {
            return (null, unknown);
        }
        if (query.Unit is not null && !TemperatureUnits.IsKnown(query.Unit))
        {
            return (null, ApiProblems.BadRequest("unit", TemperatureUnits.UnknownUnitMessage));
        }
        long from = long.MinValue, to = long.MaxValue;
        if (query.From is not null)
        {
            if (!IsoTime.TryParse(query.From, out var f, out var error))
            {
                return (null, ApiProblems.BadRequest("from", $"from: {error}"));
            }
            from = f.ToUnixTimeMilliseconds();
        }
        if (query.To is not null)
        {
            if (!IsoTime.TryParse(query.To, out var t, out var error))
            {
                return (null, ApiProblems.BadRequest("to", $"to: {error}"));
            }
            to = t.ToUnixTimeMilliseconds();
        }
        if (to <= from)
        {
            return (null, ApiProblems.BadRequest("to", "to must be later than from."));
        }
        if (query.Resolution is not (null or "raw" or "grid"))
        {
            return (null, ApiProblems.BadRequest("resolution", "resolution must be 'raw' (the default) or 'grid'."));
        }
        var limit = DefaultLimit;
        if (query.Limit is not null && (!int.TryParse(query.Limit, NumberStyles.None, CultureInfo.InvariantCulture, out limit)
                                        || limit < 1 || limit > MaxLimit))
        {
            return (null, ApiProblems.BadRequest("limit", $"limit must be a whole number from 1 to {MaxLimit}."));
        }
        long? cursor = null;
        if (query.Cursor is not null)
        {
            if (!long.TryParse(query.Cursor, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out var c))
            {
                return (null, ApiProblems.BadRequest("cursor", "cursor is not one this service handed out; take it from a 'next' link."));
            }
            cursor = c;
        }
        if (query.Format is not (null or "json" or "csv"))
        {
            return (null, ApiProblems.BadRequest("format", "format must be 'json' or 'csv'."));
        }
        var csv = query.Format == "csv"
            || (query.Format is null && request.Headers.Accept.ToString().Contains("text/csv", StringComparison.OrdinalIgnoreCase));
        return (new Window(from, to, cursor, limit, csv, query.Unit ?? TemperatureUnits.Celsius), null);
    }

    private static async Task<Results<Ok<ObservationPage>, Ok<GridPage>, ContentHttpResult, ProblemHttpResult>> Raw(
        SiteRecord site, Window window, HttpContext context, IReadingStore readings, CancellationToken cancellationToken)
    {
        // One more than asked tells whether another page follows.
        var page = await readings.ReadAsync(site.Id, window.FromMs, window.ToMs, window.Cursor, window.Limit + 1, cancellationToken)
            .ConfigureAwait(false) ?? [];
        var shown = page.Take(window.Limit).ToList();
        var next = page.Count > window.Limit ? NextLink(context.Request, shown[^1].TimeMs) : null;
        if (window.Csv)
        {
            var csv = new StringBuilder().CsvLine("time", "value", "originalValue", "originalUnit", "flags");
            foreach (var r in shown)
            {
                csv.CsvLine(IsoTime.Format(r.Time), Number(window.InUnit(r.ValueC)), Number(r.OriginalValue), r.OriginalUnit,
                    string.Join(';', QualityFlagNames.Of(r.Flags)));
            }
            return Csv(context, csv, next, window.Unit);
        }
        SetLink(context, next);
        var dtos = shown.Select(r => new ObservationDto(IsoTime.Format(r.Time), window.InUnit(r.ValueC), r.OriginalValue, r.OriginalUnit,
            QualityFlagNames.Of(r.Flags))).ToList();
        return TypedResults.Ok(new ObservationPage(site.Id, "raw", window.Unit, dtos, next));
    }

    /// <summary>
    /// The grid page is built from the readings of the page plus a margin of a few steps on each
    /// side, so gap interpolation at a page edge is the same as over the whole series.
    /// </summary>
    private static async Task<Results<Ok<ObservationPage>, Ok<GridPage>, ContentHttpResult, ProblemHttpResult>> Grid(
        SiteRecord site, Window window, HttpContext context, IReadingStore readings, CancellationToken cancellationToken)
    {
        var options = site.GridOptions;
        var zone = GridBuilder.FindZone(site.TimeZone);
        var span = await readings.SpanAsync(site.Id, cancellationToken).ConfigureAwait(false);
        var points = new List<GridPointDto>();
        string? next = null;
        if (span is { } s)
        {
            // The grid covers the stored data inside [from, to), not empty years around it.
            var start = Math.Max(Math.Max(window.Cursor ?? long.MinValue, window.FromMs), s.FirstMs);
            var end = Math.Min(window.ToMs, s.LastMs + 1);
            if (start < end)
            {
                var pageStart = GridClock.StepStart(options.Cadence, zone, DateTimeOffset.FromUnixTimeMilliseconds(start));
                var pageEnd = Min(GridClock.StepAfter(options.Cadence, zone, pageStart, window.Limit), DateTimeOffset.FromUnixTimeMilliseconds(end));
                var margin = options.MaxInterpolatedGap + 1;
                var readFrom = GridClock.StepAfter(options.Cadence, zone, pageStart, -margin);
                var readTo = GridClock.StepAfter(options.Cadence, zone, GridClock.StepStart(options.Cadence, zone, pageEnd.AddTicks(-1)), margin + 1);
                var stored = await readings.ReadAsync(site.Id, readFrom.ToUnixTimeMilliseconds(), readTo.ToUnixTimeMilliseconds(),
                    null, MaxReadingsPerGridPage, cancellationToken).ConfigureAwait(false) ?? [];
                var grid = GridBuilder.Build(stored.Select(r => new GridReading(r.Time, r.ValueC, r.Flags != QualityFlags.None)),
                    options, readFrom, readTo);
                for (var i = 0; i < grid.Count; i++)
                {
                    if (grid.Times[i] >= pageStart && grid.Times[i] < pageEnd)
                    {
                        points.Add(new GridPointDto(Local(grid.Times[i]), double.IsNaN(grid.Values[i]) ? null : window.InUnit(grid.Values[i]), grid.Interpolated[i]));
                    }
                }
                next = pageEnd.ToUnixTimeMilliseconds() < end ? NextLink(context.Request, pageEnd.ToUnixTimeMilliseconds()) : null;
            }
        }
        if (window.Csv)
        {
            var csv = new StringBuilder().CsvLine("time", "value", "interpolated");
            foreach (var p in points)
            {
                csv.CsvLine(p.Time, p.Value is { } v ? Number(v) : "", p.Interpolated ? "true" : "false");
            }
            return Csv(context, csv, next, window.Unit);
        }
        SetLink(context, next);
        return TypedResults.Ok(new GridPage(site.Id, "grid", WireNames.Cadences.Of(site.Cadence), site.TimeZone, window.Unit, points, next));
    }

    private static DateTimeOffset Min(DateTimeOffset a, DateTimeOffset b) => a < b ? a : b;

    // Grid steps are shown in the site's local time with its offset (daily steps start at local midnight).
    private static string Local(DateTimeOffset time) => time.ToString("yyyy-MM-dd'T'HH:mm:sszzz", CultureInfo.InvariantCulture);

    private static string Number(double value) => value.ToString("R", CultureInfo.InvariantCulture);

    private static string NextLink(HttpRequest request, long cursor)
    {
        var query = request.Query.Where(q => q.Key != "cursor")
            .SelectMany(q => q.Value.Select(v => new KeyValuePair<string, string?>(q.Key, v)))
            .Append(new KeyValuePair<string, string?>("cursor", cursor.ToString(CultureInfo.InvariantCulture)));
        return QueryHelpers.AddQueryString(request.Path.ToString(), query);
    }

    private static void SetLink(HttpContext context, string? next) => Http.NextLink.Set(context.Response, next);

    private static ContentHttpResult Csv(HttpContext context, StringBuilder csv, string? next, string unit)
    {
        SetLink(context, next);
        // As the forecast export: the CSV's values carry no unit of their own.
        context.Response.Headers["Temperature-Unit"] = unit;
        return TypedResults.Text(csv.ToString(), "text/csv; charset=utf-8");
    }
}
