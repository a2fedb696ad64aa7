namespace ForecastHub.Core.Autoregression;

/// <summary>Where the characteristic roots of a fitted AR lie.</summary>
public enum StationarityStatus
{
    /// <summary>Every root has modulus of at least <see cref="CharacteristicRoots.NearUnitRootModulus"/>.</summary>
    Stationary,

    /// <summary>Stationary, but the smallest root modulus is below <see cref="CharacteristicRoots.NearUnitRootModulus"/>: forecast variances grow slowly and the mean is poorly determined.</summary>
    NearUnitRoot,

    /// <summary>A root on or inside the unit circle: the fitted process is not stationary.</summary>
    NonStationary,
}
