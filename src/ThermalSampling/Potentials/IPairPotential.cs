using System.Runtime.CompilerServices;
using ThermalSampling.Numerics;

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

    /// <summary>
    /// V(r) in every lane of a vector of separations: the lane form the samplers call, several chains per register.
    /// Each lane must be computed with exactly rounded operations in the same order at every width, so that results do not
    /// depend on the width the hardware picks. A potential with no vector form returns
    /// <see cref="LaneForms.ByLane{TOps, TD, TB, TPotential}(in TPotential, TD)"/>, which calls <see cref="Energy"/> lane by lane.
    /// </summary>
    /// <typeparam name="TOps">The lane width (<see cref="Lanes8"/>, <see cref="Lanes4"/>, <see cref="Lanes2"/>, <see cref="Lanes1"/>).</typeparam>
    /// <typeparam name="TD">Doubles, one per lane.</typeparam>
    /// <typeparam name="TB">Raw words, one per lane.</typeparam>
    /// <param name="r">Separations in Å.</param>
    TD LaneEnergy<TOps, TD, TB>(TD r)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct;

    /// <summary>
    /// V at squared separations in every lane (the 3D site loop's form). A form that depends on r² (Lennard-Jones) skips the
    /// square root; others return <see cref="LaneForms.ViaDistance{TOps, TD, TB, TPotential}(in TPotential, TD)"/>, and a
    /// potential with no vector form <see cref="LaneForms.ByLaneAtSquaredDistance{TOps, TD, TB, TPotential}(in TPotential, TD)"/>.
    /// </summary>
    /// <typeparam name="TOps">The lane width.</typeparam>
    /// <typeparam name="TD">Doubles, one per lane.</typeparam>
    /// <typeparam name="TB">Raw words, one per lane.</typeparam>
    /// <param name="squaredDistance">r² in Å².</param>
    TD LaneEnergyAtSquaredDistance<TOps, TD, TB>(TD squaredDistance)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct;
}

/// <summary>Ready-made lane forms for <see cref="IPairPotential"/> implementations.</summary>
public static class LaneForms
{
    /// <summary>V(r) lane by lane through <see cref="IPairPotential.Energy"/>: correct at every width, and as fast as the scalar form.</summary>
    /// <typeparam name="TOps">The lane width.</typeparam>
    /// <typeparam name="TD">Doubles, one per lane.</typeparam>
    /// <typeparam name="TB">Raw words, one per lane.</typeparam>
    /// <typeparam name="TPotential">The potential.</typeparam>
    /// <param name="potential">The potential.</param>
    /// <param name="r">Separations in Å.</param>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static TD ByLane<TOps, TD, TB, TPotential>(in TPotential potential, TD r)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        where TPotential : struct, IPairPotential
    {
        var e = r;
        for (int lane = 0; lane < TOps.Count; lane++)
        {
            e = TOps.Set(e, lane, potential.Energy(TOps.Get(r, lane)));
        }
        return e;
    }

    /// <summary>V at squared separations lane by lane through <see cref="IPairPotential.EnergyAtSquaredDistance"/>.</summary>
    /// <typeparam name="TOps">The lane width.</typeparam>
    /// <typeparam name="TD">Doubles, one per lane.</typeparam>
    /// <typeparam name="TB">Raw words, one per lane.</typeparam>
    /// <typeparam name="TPotential">The potential.</typeparam>
    /// <param name="potential">The potential.</param>
    /// <param name="squaredDistance">r² in Å².</param>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static TD ByLaneAtSquaredDistance<TOps, TD, TB, TPotential>(in TPotential potential, TD squaredDistance)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        where TPotential : struct, IPairPotential
    {
        var e = squaredDistance;
        for (int lane = 0; lane < TOps.Count; lane++)
        {
            e = TOps.Set(e, lane, potential.EnergyAtSquaredDistance(TOps.Get(squaredDistance, lane)));
        }
        return e;
    }

    /// <summary>V at squared separations through the potential's own <see cref="IPairPotential.LaneEnergy{TOps, TD, TB}(TD)"/> at √r².</summary>
    /// <typeparam name="TOps">The lane width.</typeparam>
    /// <typeparam name="TD">Doubles, one per lane.</typeparam>
    /// <typeparam name="TB">Raw words, one per lane.</typeparam>
    /// <typeparam name="TPotential">The potential.</typeparam>
    /// <param name="potential">The potential.</param>
    /// <param name="squaredDistance">r² in Å².</param>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static TD ViaDistance<TOps, TD, TB, TPotential>(in TPotential potential, TD squaredDistance)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        where TPotential : struct, IPairPotential
        => potential.LaneEnergy<TOps, TD, TB>(TOps.Sqrt(squaredDistance));
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
/// <param name="EquilibriumDistanceInAngstroms">The separation of the minimum, Å.</param>
/// <param name="MinimumEnergyInElectronVolts">V at the minimum, eV.</param>
/// <param name="WellDepthInElectronVolts">The energy needed to leave the well towards large separations, eV:
/// V(far) − V(min), where "far" is infinity, the cut-off, or the last table point; +∞ for a harmonic bond.</param>
public sealed record PotentialWell(double EquilibriumDistanceInAngstroms, double MinimumEnergyInElectronVolts, double WellDepthInElectronVolts);
