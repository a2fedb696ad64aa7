namespace ForecastHub.Api.Models;

/// <summary>GET .../model: the fitted model and its diagnostics with the field names of DESIGN section 5.</summary>
/// <param name="Unit">Unit of the terms that are temperatures (C, F or K): the seasonality's level, its amplitudes and their standard
/// errors, the AR mean, the innovation variance (squared units), and the residuals' mean and sd. Differences and variances only scale;
/// coefficients, correlations, test statistics and the information criteria (those of the fit in degrees C) are unchanged.</param>
public sealed record ModelResponse(
    string SiteId,
    string Unit,
    DateTimeOffset FittedAt,
    double FitDurationMs,
    long SettingsVersion,
    ModelSettingsUsed Settings,
    ModelWindow Window,
    SeasonalityResponse Seasonality,
    ArResponse Ar,
    OrderSelectionResponse OrderSelection,
    IReadOnlyList<LagValueResponse> Acf,
    ResidualsResponse Residuals,
    IntervalsResponse Intervals,
    IReadOnlyList<string> Notes,
    LastFitAttempt? LastAttempt);

public sealed record ModelSettingsUsed(string Seasonality, string Method, string OrderPolicy, int MaxOrder, int FitWindowDays, string IntervalMethod);

public sealed record ModelWindow(DateTimeOffset From, DateTimeOffset To, int Points, int Interpolated, int Segments);

public sealed record SeasonalityResponse(
    string Requested,
    string Applied,
    int AnnualHarmonics,
    int DiurnalHarmonics,
    string Estimation,
    IReadOnlyList<TermResponse> Terms,
    string? VarianceModel);

public sealed record TermResponse(string Name, double Value, double StdError);

public sealed record ArResponse(
    string Method,
    int Order,
    double Mean,
    IReadOnlyList<CoefficientResponse> Coefficients,
    double InnovationVariance,
    IReadOnlyList<RootResponse> Roots,
    bool Stationary);

public sealed record CoefficientResponse(int Lag, double Value, double StdError);

public sealed record RootResponse(double Real, double Imaginary, double Modulus);

public sealed record OrderSelectionResponse(
    string Policy,
    int MaxOrder,
    double Band,
    int PacfCutoff,
    IReadOnlyList<LagValueResponse> Pacf,
    IReadOnlyList<CriteriaResponse> Criteria,
    int ChosenOrder,
    string CriteriaSample);

public sealed record LagValueResponse(int Lag, double Value);

public sealed record CriteriaResponse(int Order, double Aic, double Aicc, double Bic);

/// <summary>Ljung-Box and Jarque-Bera are null when there are too few residuals for them.</summary>
public sealed record ResidualsResponse(
    LjungBoxResponse? LjungBox,
    JarqueBeraResponse? JarqueBera,
    double Mean,
    double Sd,
    double Skewness,
    double Kurtosis);

public sealed record LjungBoxResponse(int Lags, double Statistic, int Df, double PValue);

public sealed record JarqueBeraResponse(double Statistic, int Df, double PValue);

/// <summary>How the prediction intervals are made: "calibrated" (scaled by rolling-origin errors) or "gaussian".</summary>
public sealed record IntervalsResponse(string Method, string? Detail);

public sealed record LastFitAttempt(DateTimeOffset AttemptedAt, bool Failed, string? Error);
