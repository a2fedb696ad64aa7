using ForecastHub.Storage.Readings;
using ForecastHub.Api.OpenApi;
using Microsoft.AspNetCore.Mvc;

namespace ForecastHub.Api.Observations;

/// <summary>Answer to a post: how many readings were stored new, were already there, replaced an
/// earlier value, or carry QC flags, and every row that was refused with its position and reason.
/// <c>index</c> counts readings from 0 (JSON array position, CSV data row); <c>line</c> is the CSV
/// line number (the header is line 1), null for JSON.</summary>
public sealed record ObservationsAnswer(int Accepted, int Duplicates, int Replaced, int Flagged, IReadOnlyList<RejectedReading> Rejected);

public sealed record RejectedReading(int Index, int? Line, string? Time, string Reason);

/// <summary>A stored reading: value in the page's unit (degrees C unless <c>unit</c> asked otherwise), the value and unit as sent, QC flag names.</summary>
public sealed record ObservationDto(string Time, double Value, double OriginalValue, string OriginalUnit, IReadOnlyList<string> Flags);

/// <summary>One page of raw readings; follow <c>next</c> until it is null.</summary>
public sealed record ObservationPage(string SiteId, string Resolution, string Unit, IReadOnlyList<ObservationDto> Readings, string? Next);

/// <summary>A grid step: its start, the value (null when missing) and whether it was interpolated.</summary>
public sealed record GridPointDto(string Time, double? Value, bool Interpolated);

/// <summary>One page of the site's regular grid; follow <c>next</c> until it is null.</summary>
public sealed record GridPage(string SiteId, string Resolution, string Cadence, string TimeZone, string Unit,
    IReadOnlyList<GridPointDto> Points, string? Next);

/// <summary>A reading as sent, before validation: the raw time text, the value if it was a number,
/// the row's own unit, or why the row could not even be read.</summary>
internal readonly record struct RawReading(int Index, int? Line, string? Time, double? Value, string? Unit, string? Error);

/// <summary>A request's readings after the row rules: how many rows were sent, the valid readings
/// (with their request index), the refused rows, the time text and CSV line of a row by index, and
/// the values sent in degrees C that the physical range refused (for the batch's unit check).</summary>
internal sealed record ReadingBatch(int Count, List<IncomingReading> Valid, List<RejectedReading> Rejected,
    Func<int, string?> TimeText, Func<int, int?> Line, List<double> ImpossibleCelsius);

/// <summary>The JSON body of a post as the OpenAPI document shows it; the handler parses the body
/// itself, strictly, and also reads <c>text/csv</c> (<c>time,value[,unit]</c>).</summary>
public sealed record ObservationsBody(string? Unit, IReadOnlyList<ReadingBody> Readings);

/// <summary>One reading: ISO 8601 time with an offset, and the value in the body's unit.</summary>
public sealed record ReadingBody(string Time, double Value);

/// <summary>The query of a post: the unit and conflict policy of every body, the layout of a CSV
/// export (<see cref="CsvLayout"/>), and whether times without an offset are the site's local times.</summary>
public sealed record IngestQuery
{
    /// <summary>Unit of values without their own: C (default), F or K.</summary>
    [FromQuery(Name = "unit"), QueryValue(QueryValueKind.Choice, Values = [TemperatureUnits.Celsius, TemperatureUnits.Fahrenheit, TemperatureUnits.Kelvin], Default = TemperatureUnits.Celsius)] public string? Unit { get; init; }

    /// <summary>reject (default) or replace: what a different value for a stored time does.</summary>
    [FromQuery(Name = "onConflict"), QueryValue(QueryValueKind.Choice, Values = ["reject", "replace"], Default = "reject")] public string? OnConflict { get; init; }

    /// <summary>CSV: the time column, by header name or 1-based position (default 'time').</summary>
    [FromQuery(Name = "timeColumn")] public string? TimeColumn { get; init; }

    /// <summary>CSV: the value column, by header name or 1-based position (default 'value').</summary>
    [FromQuery(Name = "valueColumn")] public string? ValueColumn { get; init; }

    /// <summary>CSV: the unit column, by header name or 1-based position (default: a column named 'unit', if any).</summary>
    [FromQuery(Name = "unitColumn")] public string? UnitColumn { get; init; }

    /// <summary>CSV: the field separator: comma (the default; ',' also works), semicolon (';') or tab.</summary>
    [FromQuery(Name = "separator"), QueryValue(QueryValueKind.Choice, Values = ["comma", "semicolon", "tab"], Default = "comma")] public string? Separator { get; init; }

    /// <summary>CSV: the decimal mark: point (the default; '.' also works) or comma (',').</summary>
    [FromQuery(Name = "decimal"), QueryValue(QueryValueKind.Choice, Values = ["point", "comma"], Default = "point")] public string? DecimalMark { get; init; }

    /// <summary>true: times without an offset are wall-clock times of the site's zone (see the README for repeated hours).</summary>
    [FromQuery(Name = "localTimes")] public bool? LocalTimes { get; init; }

    internal bool NamesCsvLayout => TimeColumn is not null || ValueColumn is not null || UnitColumn is not null || Separator is not null || DecimalMark is not null;
}
