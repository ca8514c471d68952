using System.Globalization;
using System.Runtime.CompilerServices;
using ThermalSampling.Numerics;
using ThermalSampling.Internal;
using ThermalSampling.Units;

namespace ThermalSampling.Potentials;

/// <summary>
/// The harmonic bond V(r) = ½k(r − r0)²: the reference case whose classical distribution on a line is
/// an exact Gaussian of variance kT/k and whose anharmonic corrections vanish.
/// </summary>
public readonly struct HarmonicBond : IPairPotential
{
    private readonly double _k;
    private readonly double _r0;

    /// <summary>Builds a harmonic bond.</summary>
    /// <param name="stiffnessElectronVoltsPerAngstromSquared">k, in eV/Å²; must be positive.</param>
    /// <param name="equilibriumDistance">r0; must be positive.</param>
    public HarmonicBond(double stiffnessElectronVoltsPerAngstromSquared, Length equilibriumDistance)
    {
        _k = Preconditions.CheckPositive(stiffnessElectronVoltsPerAngstromSquared, nameof(stiffnessElectronVoltsPerAngstromSquared));
        _r0 = Preconditions.CheckPositive(equilibriumDistance.InAngstroms, nameof(equilibriumDistance));
    }

    /// <summary>k, in eV/Å².</summary>
    public double StiffnessElectronVoltsPerAngstromSquared => _k;

    /// <inheritdoc/>
    public double DomainLower => 0;

    /// <inheritdoc/>
    public double DomainUpper => double.PositiveInfinity;

    /// <inheritdoc/>
    public PotentialWell? Well => new(_r0, 0, double.PositiveInfinity);

    /// <inheritdoc/>
    public string Description => string.Create(CultureInfo.InvariantCulture,
        $"harmonic bond (k = {_k:G6} eV/Å², r0 = {_r0:G6} Å)");

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergy<TOps, TD, TB>(TD r)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var x = TOps.Subtract(r, TOps.Broadcast(_r0));
        return TOps.Multiply(TOps.Multiply(TOps.Broadcast(0.5 * _k), x), x);
    }

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergyAtSquaredDistance<TOps, TD, TB>(TD squaredDistance)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        => LaneForms.ViaDistance<TOps, TD, TB, HarmonicBond>(this, squaredDistance);

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double Energy(double r)
    {
        double x = r - _r0;
        return 0.5 * _k * x * x;
    }

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double EnergyAtSquaredDistance(double squaredDistance) => Energy(System.Math.Sqrt(squaredDistance));

    /// <inheritdoc/>
    public PairDerivatives Derivatives(double r)
    {
        double x = r - _r0;
        return new PairDerivatives(0.5 * _k * x * x, _k * x, _k, 0, 0);
    }
}
