using System.Text.Json;
using System.Text.Json.Serialization;

namespace ForecastHub.Core.Tests.Support;

internal static class JsonNaN
{
    /// <summary>Grid values carry NaN for missing steps, which plain JSON numbers cannot hold.</summary>
    public static readonly JsonSerializerOptions Options = new() { NumberHandling = JsonNumberHandling.AllowNamedFloatingPointLiterals };
}
