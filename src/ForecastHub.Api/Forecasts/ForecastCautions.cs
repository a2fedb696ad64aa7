namespace ForecastHub.Api.Forecasts;

/// <summary>The cautions of DESIGN section 8, carried by every forecast answer and chart.</summary>
public static class ForecastCautions
{
    public const string OwnHistoryOnly =
        "This forecast is statistical and built only from this site's own measured history: it cannot see an approaching front or any weather it has not measured.";

    public const string OfficialWarningsFirst =
        "For frost protection, heat stress, road ice and other decisions where people or property are at risk, official warnings, local codes and licensed practice come first.";

    public static IReadOnlyList<string> All { get; } = [OwnHistoryOnly, OfficialWarningsFirst];
}
