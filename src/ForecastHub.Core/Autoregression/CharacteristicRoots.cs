using MathNet.Numerics.LinearAlgebra;

namespace ForecastHub.Core.Autoregression;

/// <summary>Roots of the AR characteristic polynomial 1 - sum phi_i z^i (as R's <c>polyroot(c(1, -phi))</c>) and stationarity.</summary>
public static class CharacteristicRoots
{
    /// <summary>Below this smallest root modulus a stationary fit is reported as near a unit root (|phi| &gt; 0.990 for AR(1); common practice, no source).</summary>
    public const double NearUnitRootModulus = 1.01;

    /// <summary>Roots sorted by increasing modulus; trailing zero coefficients lower the degree; an empty or all-zero phi has no roots. NaN in phi throws SeriesException(NonFinite).</summary>
    public static IReadOnlyList<CharacteristicRoot> Of(IReadOnlyList<double> phi)
    {
        ArgumentNullException.ThrowIfNull(phi);
        var degree = phi.Count;
        for (var i = 0; i < phi.Count; i++)
        {
            if (!double.IsFinite(phi[i]))
            {
                throw new Series.SeriesException(Series.SeriesProblem.NonFinite, $"Coefficient {i + 1} is not finite.");
            }
        }

        while (degree > 0 && phi[degree - 1] == 0)
        {
            degree--;
        }

        if (degree == 0)
        {
            return [];
        }

        // Eigenvalues of the companion matrix are the inverse roots 1/z.
        var companion = Matrix<double>.Build.Dense(degree, degree);
        for (var i = 0; i < degree; i++)
        {
            companion[0, i] = phi[i];
        }

        for (var i = 1; i < degree; i++)
        {
            companion[i, i - 1] = 1;
        }

        var roots = new List<CharacteristicRoot>(degree);
        foreach (var lambda in companion.Evd().EigenValues)
        {
            var z = 1 / lambda;
            roots.Add(new CharacteristicRoot(z.Real, z.Imaginary, z.Magnitude));
        }

        roots.Sort((a, b) => a.Modulus.CompareTo(b.Modulus));
        return roots;
    }

    /// <summary>Classifies roots; no roots (AR(0)) is stationary.</summary>
    public static StationarityStatus Classify(IReadOnlyList<CharacteristicRoot> roots)
    {
        ArgumentNullException.ThrowIfNull(roots);
        var smallest = double.PositiveInfinity;
        foreach (var root in roots)
        {
            smallest = Math.Min(smallest, root.Modulus);
        }

        if (smallest <= 1)
        {
            return StationarityStatus.NonStationary;
        }

        return smallest < NearUnitRootModulus ? StationarityStatus.NearUnitRoot : StationarityStatus.Stationary;
    }
}
