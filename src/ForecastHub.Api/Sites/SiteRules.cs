using System.Text.Json;
using System.Text.RegularExpressions;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Quality;
using ForecastHub.Core.Risk;
using ForecastHub.Core.Settings;
using ForecastHub.Storage.Sites;

namespace ForecastHub.Api.Sites;

/// <summary>The site rules of DESIGN section 3: what a valid site body is. The body's words are
/// parsed here, once, into the typed settings of the core (words in <see cref="WireNames"/>,
/// defaults and model ranges in <see cref="ModelSettings"/>).</summary>
public static partial class SiteRules
{
    public const int MaxNameLength = 200;

    /// <summary>DESIGN section 5: readings outside this range after conversion are impossible.</summary>
    public const double PhysicalMinC = -95;
    public const double PhysicalMaxC = 65;

    [GeneratedRegex("^[a-z0-9][a-z0-9-]{0,62}$")]
    public static partial Regex SiteId();

    [GeneratedRegex("^[a-z0-9][a-z0-9-]{0,31}$")]
    private static partial Regex ThresholdId();

    [GeneratedRegex(@"^[A-Za-z0-9_+\-]+(/[A-Za-z0-9_+\-]+){0,3}$")]
    private static partial Regex TimeZoneShape();

    public static bool IsValidSiteId(string? id) => id is not null && SiteId().IsMatch(id);

    /// <summary>An IANA zone known to this machine's time-zone database (Windows names are refused).</summary>
    public static bool IsIanaTimeZone(string zone) =>
        TimeZoneShape().IsMatch(zone)
        && TimeZoneInfo.TryFindSystemTimeZoneById(zone, out var info)
        && info.HasIanaId;

    /// <summary>
    /// The site that <paramref name="body"/> describes: a new one when <paramref name="current"/> is
    /// null, else <paramref name="current"/> changed by the fields present in <paramref name="raw"/>.
    /// Errors go into <paramref name="errors"/> keyed by field path; the answer is null if any.
    /// </summary>
    public static SiteRecord? Build(SiteBody body, JsonElement raw, SiteRecord? current, DateTimeOffset now,
        Dictionary<string, string[]> errors)
    {
        ArgumentNullException.ThrowIfNull(body);
        ArgumentNullException.ThrowIfNull(errors);
        var creating = current is null;
        void Error(string field, string message) => errors[field] = [message];
        bool Present(string name) => raw.TryGetProperty(name, out _);

        var id = current?.Id ?? body.Id;
        if (creating && !IsValidSiteId(body.Id))
        {
            Error("id", body.Id is null
                ? "id is required: a slug of lower-case letters, digits and '-', at most 63 characters, starting with a letter or digit."
                : "id must be a slug of lower-case letters, digits and '-', at most 63 characters, starting with a letter or digit.");
        }
        else if (!creating && body.Id is not null && body.Id != current!.Id)
        {
            Error("id", "id cannot be changed; create a new site instead.");
        }

        var name = body.Name ?? current?.Name;
        if (name is null && creating)
        {
            Error("name", "name is required.");
        }
        else if (name is not null && (name.Trim().Length == 0 || name.Length > MaxNameLength || name.Any(char.IsControl)))
        {
            Error("name", $"name must be 1 to {MaxNameLength} characters without control characters.");
        }

        var timeZone = body.TimeZone ?? current?.TimeZone;
        if (timeZone is null)
        {
            Error("timeZone", "timeZone is required: an IANA time zone such as 'Europe/Berlin' or 'UTC'.");
        }
        else if (body.TimeZone is not null && !IsIanaTimeZone(body.TimeZone))
        {
            Error("timeZone", "timeZone must be an IANA time zone such as 'Europe/Berlin' or 'UTC'.");
        }

        var cadence = current?.Cadence;
        if (body.Cadence is not null)
        {
            cadence = WireNames.Cadences.TryParse(body.Cadence, out var parsed) ? parsed : null;
            if (cadence is null)
            {
                Error("cadence", "cadence must be 'hourly' or 'daily'.");
            }
        }
        else if (cadence is null)
        {
            Error("cadence", "cadence is required: 'hourly' or 'daily'.");
        }

        DailyStatistic? dailyStatistic = null;
        if (cadence == GridCadence.Daily)
        {
            if (body.DailyStatistic is null)
            {
                dailyStatistic = current?.DailyStatistic ?? DailyStatistic.Mean;
            }
            else if (WireNames.DailyStatistics.TryParse(body.DailyStatistic, out var statistic))
            {
                dailyStatistic = statistic;
            }
            else
            {
                Error("dailyStatistic", "dailyStatistic must be 'mean', 'min' or 'max'.");
            }
        }
        else if (body.DailyStatistic is not null)
        {
            Error("dailyStatistic", "dailyStatistic applies to daily sites only.");
        }

        var latitude = Present("latitude") ? body.Latitude : current?.Latitude;
        var longitude = Present("longitude") ? body.Longitude : current?.Longitude;
        var elevation = Present("elevationM") ? body.ElevationM : current?.ElevationM;
        CheckRange(latitude, -90, 90, "latitude", errors);
        CheckRange(longitude, -180, 180, "longitude", errors);
        CheckRange(elevation, -500, 9000, "elevationM", errors);

        var quality = MergeQuality(body.Quality, current?.Quality, errors);
        var model = MergeModel(body.Model, current?.Model ?? ModelSettings.DefaultFor(cadence ?? GridCadence.Hourly), errors);

        var risk = MergeRisk(body, raw, current?.Risk ?? SiteRiskSettings.Default, errors);

        if (errors.Count > 0)
        {
            return null;
        }
        return new SiteRecord(id!, name!.Trim(), timeZone!, cadence!.Value, dailyStatistic, latitude, longitude, elevation,
            quality, model, current?.CreatedAt ?? now, now, current?.SettingsVersion ?? 1)
        {
            Key = current?.Key ?? 0,
            Risk = risk,
        };
    }

    private static QualityLimits MergeQuality(QualityBody? body, QualityLimits? current, Dictionary<string, string[]> errors)
    {
        var limits = current is null
            ? QualityDefaults.For(body)
            : new QualityLimits(body?.MinC ?? current.MinC, body?.MaxC ?? current.MaxC,
                body?.MaxStepCPerHour ?? current.MaxStepCPerHour, body?.FlatlineHours ?? current.FlatlineHours);
        CheckRange(limits.MinC, PhysicalMinC, PhysicalMaxC, "quality.minC", errors);
        CheckRange(limits.MaxC, PhysicalMinC, PhysicalMaxC, "quality.maxC", errors);
        if (limits.MinC >= limits.MaxC)
        {
            errors["quality.maxC"] = [$"quality.maxC ({limits.MaxC}) must be above quality.minC ({limits.MinC})."];
        }
        CheckRange(limits.MaxStepCPerHour, 0.1, 160, "quality.maxStepCPerHour", errors);
        CheckRange(limits.FlatlineHours, 1, 24 * 31, "quality.flatlineHours", errors);
        return limits;
    }

    private static ModelSettings MergeModel(ModelBody? body, ModelSettings current, Dictionary<string, string[]> errors)
    {
        var model = current with
        {
            Seasonality = Choice(body?.Seasonality, current.Seasonality, WireNames.Seasonalities, "model.seasonality", errors),
            Method = Choice(body?.Method, current.Method, WireNames.Methods, "model.method", errors),
            OrderPolicy = Choice(body?.OrderPolicy, current.OrderPolicy, WireNames.OrderPolicies, "model.orderPolicy", errors),
            MaxOrder = body?.MaxOrder ?? current.MaxOrder,
            FitWindowDays = body?.FitWindowDays ?? current.FitWindowDays,
            IntervalMethod = Choice(body?.IntervalMethod, current.IntervalMethod, WireNames.IntervalMethods, "model.intervalMethod", errors),
        };
        CheckRange(model.MaxOrder, 1, ModelSettings.MaxMaxOrder, "model.maxOrder", errors);
        CheckRange(model.FitWindowDays, ModelSettings.MinFitWindowDays, ModelSettings.MaxFitWindowDays, "model.fitWindowDays", errors);
        return model;
    }

    /// <summary>Thresholds sent replace the whole list (null or [] clears it); night fields sent replace their value.</summary>
    private static SiteRiskSettings MergeRisk(SiteBody body, JsonElement raw, SiteRiskSettings current, Dictionary<string, string[]> errors)
    {
        var thresholds = current.Thresholds;
        if (raw.ValueKind == JsonValueKind.Object && raw.TryGetProperty("thresholds", out _))
        {
            var sent = body.Thresholds ?? [];
            if (sent.Count > SiteRiskSettings.MaxThresholds)
            {
                errors["thresholds"] = [$"A site has at most {SiteRiskSettings.MaxThresholds} thresholds; {sent.Count} were sent."];
            }

            var list = new List<SiteThreshold>();
            for (var i = 0; i < sent.Count && i < SiteRiskSettings.MaxThresholds; i++)
            {
                var t = sent[i];
                var at = $"thresholds[{i}]";
                if (t is null)
                {
                    errors[at] = [$"{at} must be an object {{id, direction, valueC, alertProbability?}}."];
                    continue;
                }

                if (t.Id is null || !ThresholdId().IsMatch(t.Id))
                {
                    errors[$"{at}.id"] = [$"{at}.id is required: a slug of lower-case letters, digits and '-', at most 32 characters, such as 'frost'."];
                }
                else if (list.Any(other => other.Id == t.Id))
                {
                    errors[$"{at}.id"] = [$"{at}.id '{t.Id}' is used twice; threshold ids must be unique within the site."];
                }

                if (!WireNames.ThresholdDirections.TryParse(t.Direction, out var direction))
                {
                    errors[$"{at}.direction"] = [$"{at}.direction must be 'below' or 'above'."];
                }

                if (t.ValueC is not { } v || !double.IsFinite(v) || v < PhysicalMinC || v > PhysicalMaxC)
                {
                    errors[$"{at}.valueC"] = [$"{at}.valueC is required: a temperature in degrees C between {PhysicalMinC} and {PhysicalMaxC}."];
                }

                if (t.AlertProbability is { } a && !(a > 0 && a <= 1))
                {
                    errors[$"{at}.alertProbability"] = [$"{at}.alertProbability must be above 0 and at most 1 (leave it out for a threshold that never alerts)."];
                }

                list.Add(new SiteThreshold(t.Id ?? "", direction, t.ValueC ?? double.NaN, t.AlertProbability));
            }

            thresholds = list;
        }

        var night = current.Night;
        if (raw.ValueKind == JsonValueKind.Object && raw.TryGetProperty("night", out var sentNight) && sentNight.ValueKind == JsonValueKind.Null)
        {
            night = NightHours.Default;
        }

        var start = night.Start;
        if (body.Night?.StartLocal is { } startText && !WireNames.TryParseClockTime(startText, out start))
        {
            errors["night.startLocal"] = ["night.startLocal must be a local clock time \"HH:mm\" from 00:00 to 23:59, such as \"18:00\"."];
        }

        var end = night.End;
        if (body.Night?.EndLocal is { } endText && !WireNames.TryParseClockTime(endText, out end))
        {
            errors["night.endLocal"] = ["night.endLocal must be a local clock time \"HH:mm\" from 00:00 to 23:59, such as \"09:00\"."];
        }
        else if (start == end && !errors.ContainsKey("night.startLocal"))
        {
            errors["night.endLocal"] = ["night.endLocal must differ from night.startLocal (an end at or before the start runs past midnight)."];
        }

        return new SiteRiskSettings(thresholds, new NightHours(start, end));
    }

    // The value of a word in the body, the current value when the body leaves it out; an unknown word is an error naming the field.
    private static T Choice<T>(string? word, T current, WordTable<T> table, string field, Dictionary<string, string[]> errors)
        where T : struct, Enum
    {
        if (word is null)
        {
            return current;
        }
        if (table.TryParse(word, out var value))
        {
            return value;
        }
        errors[field] = [$"{field} must be one of {string.Join(", ", table.Words.Select(a => $"'{a}'"))}."];
        return current;
    }

    private static void CheckRange(double? value, double min, double max, string field, Dictionary<string, string[]> errors)
    {
        if (value is { } v && (!double.IsFinite(v) || v < min || v > max))
        {
            errors[field] = [$"{field} must be between {min} and {max}."];
        }
    }
}
