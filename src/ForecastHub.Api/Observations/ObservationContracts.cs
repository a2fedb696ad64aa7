using ForecastHub.Storage.Readings;

namespace ForecastHub.Api.Observations;

/// <summary>Answer to a post: how many readings were stored new, were already there, replaced an
/// earlier value, or carry QC flags, and every row that was refused with its position and reason.
/// <c>index</c> counts readings from 0 (JSON array position, CSV data row); <c>line</c> is the CSV
/// line number (the header is line 1), null for JSON.</summary>
public sealed record ObservationsAnswer(int Accepted, int Duplicates, int Replaced, int Flagged, IReadOnlyList<RejectedReading> Rejected);

public sealed record RejectedReading(int Index, int? Line, string? Time, string Reason);

/// <summary>A stored reading: value in degrees C, the value and unit as sent, QC flag names.</summary>
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
/// (with their request index), the refused rows, and the time text and CSV line of a row by index.</summary>
internal sealed record ReadingBatch(int Count, List<IncomingReading> Valid, List<RejectedReading> Rejected,
    Func<int, string?> TimeText, Func<int, int?> Line);

/// <summary>The JSON body of a post as the OpenAPI document shows it; the handler parses the body
/// itself, strictly, and also reads <c>text/csv</c> (<c>time,value[,unit]</c>).</summary>
public sealed record ObservationsBody(string? Unit, IReadOnlyList<ReadingBody> Readings);

/// <summary>One reading: ISO 8601 time with an offset, and the value in the body's unit.</summary>
public sealed record ReadingBody(string Time, double Value);
