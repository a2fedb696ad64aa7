using System.Text.Json;
using System.Text.Json.Serialization;
using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;

namespace ForecastHub.Api.Models;

/// <summary>The stored JSON form of the core's <see cref="SiteModel"/>.</summary>
public static class ModelJson
{
    // The model carries NaN in places (an undefined statistic); named literals keep it round-trippable.
    private static readonly JsonSerializerOptions Json = new()
    {
        NumberHandling = JsonNumberHandling.AllowNamedFloatingPointLiterals,
    };

    public static string Write(SiteModel model) => JsonSerializer.Serialize(model, Json);

    public static SiteModel Read(string json) =>
        JsonSerializer.Deserialize<SiteModel>(json, Json) ?? throw new InvalidOperationException("A stored model is empty.");
}

/// <summary>What the modeling pipeline produced for the store.</summary>
public sealed record FittedSiteModel(SiteModel Model, string Json, double? ResidualPValue, DateTimeOffset DataEnd)
{
    /// <summary>Fits the core's site model on <paramref name="grid"/> with the site's typed settings.</summary>
    public static FittedSiteModel Fit(TimeGrid grid, ModelSettings settings)
    {
        var model = SiteModelFitter.Fit(grid, settings);
        return new FittedSiteModel(model, ModelJson.Write(model), model.Diagnostics.LjungBox?.PValue, model.Window.To);
    }
}
