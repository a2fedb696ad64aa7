using ForecastHub.Core.Autoregression;
using ForecastHub.Core.Correlation;

namespace ForecastHub.Core.Selection;

/// <summary>Everything a user needs to see why an order was chosen, plus the fitted model of that order.</summary>
public sealed record OrderSelectionResult
{
    public required OrderPolicy Policy { get; init; }

    public required ArMethod Method { get; init; }

    /// <summary>min(setting, floor(10 log10 n)), lowered only when the data cannot support it.</summary>
    public required int MaxOrder { get; init; }

    /// <summary>Half-width of the PACF white-noise band, qnorm(1 - alpha/2) / sqrt(n).</summary>
    public required double Band { get; init; }

    /// <summary>P: the last lag in 1..MaxOrder with |PACF| &gt; Band; 0 when none is.</summary>
    public required int PacfCutoff { get; init; }

    /// <summary>Sample PACF (Durbin-Levinson, R pacf) at lags 1..MaxOrder.</summary>
    public required IReadOnlyList<LagValue> Pacf { get; init; }

    /// <summary>AIC, AICc and BIC for orders 0..MaxOrder.</summary>
    public required IReadOnlyList<OrderCriteria> Criteria { get; init; }

    public required CriteriaSample CriteriaSample { get; init; }

    /// <summary>Number of observations the criteria are computed on.</summary>
    public required int CriteriaSampleSize { get; init; }

    public required int ChosenOrder { get; init; }

    public required ArModel Model { get; init; }
}
