namespace ThermalSampling.Potentials;

/// <summary>
/// A central pair potential V(r) in the library's canonical units: distances in Å, energies in eV.
/// </summary>
/// <remarks>
/// Implementations are small immutable structs so that samplers generic over
/// <c>TPotential : struct, IPairPotential</c> are specialised by the JIT and call
/// <see cref="Energy"/> without a virtual or delegate call. Every implementation supplies analytic
/// (or, where documented, numerical) derivatives up to fourth order, which the harmonic and
/// anharmonic analyses use.
/// </remarks>
public interface IPairPotential
{
    /// <summary>V(r) in eV at separation <paramref name="r"/> in Å.</summary>
    /// <param name="r">The separation in Å, inside [<see cref="DomainLower"/>, <see cref="DomainUpper"/>].</param>
    double Energy(double r);

    /// <summary>V at the separation whose square is <paramref name="squaredDistance"/> (Å²), in eV.
    /// Forms that depend on r² only (Lennard-Jones) skip the square root.</summary>
    /// <param name="squaredDistance">r² in Å².</param>
    double EnergyAtSquaredDistance(double squaredDistance);

    /// <summary>V and its first four derivatives at <paramref name="r"/> (eV/Åⁿ).</summary>
    /// <param name="r">The separation in Å.</param>
    PairDerivatives Derivatives(double r);

    /// <summary>The smallest separation (Å) at which the potential is defined and trusted
    /// (0 for most forms; the short-range barrier of a Buckingham potential; the first table point).</summary>
    double DomainLower { get; }

    /// <summary>The largest separation (Å) at which the potential is defined (+∞ for analytic forms;
    /// the last table point for a tabulated potential).</summary>
    double DomainUpper { get; }

    /// <summary>The lowest minimum of the potential inside its domain, or <c>null</c> when it has none
    /// (a purely repulsive form).</summary>
    PotentialWell? Well { get; }

    /// <summary>A short human-readable description with parameters and units, for reports.</summary>
    string Description { get; }
}

/// <summary>V(r) and its first four derivatives at one separation, in eV, eV/Å, eV/Å², eV/Å³ and eV/Å⁴.</summary>
/// <param name="Energy">V(r), eV.</param>
/// <param name="First">V'(r), eV/Å.</param>
/// <param name="Second">V''(r), eV/Å².</param>
/// <param name="Third">V'''(r), eV/Å³.</param>
/// <param name="Fourth">V''''(r), eV/Å⁴.</param>
public readonly record struct PairDerivatives(double Energy, double First, double Second, double Third, double Fourth)
{
    /// <summary>Component-wise sum, for sums of potentials.</summary>
    /// <param name="left">The first set of derivatives.</param>
    /// <param name="right">The second set of derivatives.</param>
    public static PairDerivatives operator +(PairDerivatives left, PairDerivatives right)
        => new(left.Energy + right.Energy, left.First + right.First, left.Second + right.Second,
               left.Third + right.Third, left.Fourth + right.Fourth);
}

/// <summary>The minimum of a pair potential.</summary>
/// <param name="EquilibriumDistance">The separation of the minimum, Å.</param>
/// <param name="MinimumEnergy">V at the minimum, eV.</param>
/// <param name="WellDepth">The energy needed to leave the well towards large separations, eV:
/// V(far) − V(min), where "far" is infinity, the cut-off, or the last table point; +∞ for a harmonic bond.</param>
public sealed record PotentialWell(double EquilibriumDistance, double MinimumEnergy, double WellDepth);
