using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;

namespace ForecastHub.Api.Models;

/// <summary>The stored form of the core's <see cref="SiteModel"/>; the unversioned JSON of earlier builds (enums as integers) counts as format 1.</summary>
public static class ModelJson
{
    public static readonly StoredFormat<SiteModel> Format = new("model", version: 2);

    public static string Write(SiteModel model) => Format.Write(model);

    /// <summary>Null when the text is of another format (older or newer): such a model is refitted, never read.</summary>
    public static SiteModel? TryRead(string json, out int? format) => Format.TryRead(json, out var model, out format) ? model : null;
}

/// <summary>What the modeling pipeline produced for the store.</summary>
public sealed record FittedSiteModel(SiteModel Model, string Json, double? ResidualPValue, DateTimeOffset DataEnd)
{
    /// <summary>Fits the core's site model on <paramref name="grid"/> with the site's typed settings.</summary>
    public static FittedSiteModel Fit(TimeGrid grid, ModelSettings settings) => Fit(grid, settings, previous: null, TimeSpan.Zero);

    /// <summary>As <see cref="Fit(TimeGrid, ModelSettings)"/>, keeping <paramref name="previous"/>'s calibration table where <see cref="Calibration.CanCarry"/> allows.</summary>
    public static FittedSiteModel Fit(TimeGrid grid, ModelSettings settings, SiteModel? previous, TimeSpan carryLimit)
    {
        var model = SiteModelFitter.Fit(grid, settings, previous, carryLimit);
        return new FittedSiteModel(model, ModelJson.Write(model), model.Diagnostics.LjungBox?.PValue, model.Window.To);
    }
}
