using System;
using System.Globalization;
using System.Runtime.CompilerServices;
using ThermalSampling.Numerics;
using ThermalSampling.Internal;
using ThermalSampling.Units;

namespace ThermalSampling.Potentials;

/// <summary>
/// The 12-6 Lennard-Jones potential, V(r) = u0[(r0/r)¹² − 2(r0/r)⁶] = 4ε[(σ/r)¹² − (σ/r)⁶],
/// with r0 = 2^(1/6)σ the equilibrium distance and u0 = ε the well depth.
/// </summary>
public readonly struct LennardJones : IPairPotential
{
    private readonly double _r0;
    private readonly double _r0Squared;
    private readonly double _u0;

    private LennardJones(double equilibriumDistance, double wellDepth)
    {
        _r0 = equilibriumDistance;
        _r0Squared = equilibriumDistance * equilibriumDistance;
        _u0 = wellDepth;
    }

    /// <summary>Builds the potential from the distance σ where V = 0 and the well depth ε.</summary>
    /// <param name="sigma">σ; must be positive.</param>
    /// <param name="epsilon">ε; must be positive.</param>
    public static LennardJones FromSigmaEpsilon(Length sigma, Energy epsilon)
    {
        Preconditions.CheckPositive(sigma.InAngstroms, nameof(sigma));
        Preconditions.CheckPositive(epsilon.InElectronVolts, nameof(epsilon));
        return new LennardJones(Math.Pow(2, 1.0 / 6) * sigma.InAngstroms, epsilon.InElectronVolts);
    }

    /// <summary>Builds the potential from its equilibrium distance r0 and well depth u0.</summary>
    /// <param name="equilibriumDistance">r0; must be positive.</param>
    /// <param name="wellDepth">u0 (positive: the minimum is at −u0).</param>
    public static LennardJones FromMinimum(Length equilibriumDistance, Energy wellDepth)
    {
        Preconditions.CheckPositive(equilibriumDistance.InAngstroms, nameof(equilibriumDistance));
        Preconditions.CheckPositive(wellDepth.InElectronVolts, nameof(wellDepth));
        return new LennardJones(equilibriumDistance.InAngstroms, wellDepth.InElectronVolts);
    }

    /// <summary>σ = r0/2^(1/6), in Å.</summary>
    public double SigmaInAngstroms => _r0 / Math.Pow(2, 1.0 / 6);

    /// <summary>ε = u0, in eV.</summary>
    public double EpsilonInElectronVolts => _u0;

    /// <summary>r0, in Å.</summary>
    public double EquilibriumDistanceInAngstroms => _r0;

    /// <inheritdoc/>
    public double DomainLower => 0;

    /// <inheritdoc/>
    public double DomainUpper => double.PositiveInfinity;

    /// <inheritdoc/>
    public PotentialWell? Well => new(_r0, -_u0, _u0);

    /// <inheritdoc/>
    public string Description => string.Create(CultureInfo.InvariantCulture,
        $"Lennard-Jones (r0 = {_r0:G6} Å, u0 = {_u0:G6} eV; sigma = {SigmaInAngstroms:G6} Å)");

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergy<TOps, TD, TB>(TD r)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        return LaneEnergyAtSquaredDistance<TOps, TD, TB>(TOps.Multiply(r, r));
    }

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergyAtSquaredDistance<TOps, TD, TB>(TD squaredDistance)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var s2 = TOps.Divide(TOps.Broadcast(_r0Squared), squaredDistance);
        var s6 = TOps.Multiply(TOps.Multiply(s2, s2), s2);
        return TOps.Multiply(TOps.Multiply(TOps.Broadcast(_u0), s6), TOps.Subtract(s6, TOps.Broadcast(2.0)));
    }

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double Energy(double r) => EnergyAtSquaredDistance(r * r);

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double EnergyAtSquaredDistance(double squaredDistance)
    {
        double s2 = _r0Squared / squaredDistance;
        double s6 = s2 * s2 * s2;
        return _u0 * s6 * (s6 - 2.0);
    }

    /// <inheritdoc/>
    public PairDerivatives Derivatives(double r)
    {
        double s = _r0 / r;
        double s6 = s * s * s * s * s * s;
        double s12 = s6 * s6;
        double u = _u0;
        return new PairDerivatives(
            u * (s12 - 2 * s6),
            u * (-12 * s12 + 12 * s6) / r,
            u * (156 * s12 - 84 * s6) / (r * r),
            u * (-2184 * s12 + 672 * s6) / (r * r * r),
            u * (32760 * s12 - 6048 * s6) / (r * r * r * r));
    }
}
