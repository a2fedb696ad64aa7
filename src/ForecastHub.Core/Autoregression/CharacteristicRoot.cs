namespace ForecastHub.Core.Autoregression;

/// <summary>A root z of 1 - phi_1 z - ... - phi_p z^p.</summary>
public sealed record CharacteristicRoot(double Re, double Im, double Modulus);
