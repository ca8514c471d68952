using System;
using System.Globalization;
using System.Runtime.CompilerServices;
using ThermalSampling.Numerics;
using ThermalSampling.Internal;
using ThermalSampling.Units;

namespace ThermalSampling.Potentials;

/// <summary>
/// The 12-6 Lennard-Jones potential, V(r) = ε[(r_min/r)¹² − 2(r_min/r)⁶] = 4ε[(σ/r)¹² − (σ/r)⁶],
/// with ε the well depth, r_min = 2^(1/6)σ the position of the minimum and σ the distance where V = 0.
/// </summary>
public readonly struct LennardJones : IPairPotential
{
    private readonly double _rMin;
    private readonly double _rMinSquared;
    private readonly double _epsilon;

    private readonly bool _givenBySigma;

    private LennardJones(double equilibriumDistance, double wellDepth, bool givenBySigma)
    {
        _givenBySigma = givenBySigma;
        _rMin = equilibriumDistance;
        _rMinSquared = equilibriumDistance * equilibriumDistance;
        _epsilon = wellDepth;
    }

    /// <summary>Builds the potential from the distance σ where V = 0 and the well depth ε.</summary>
    /// <param name="sigma">σ; must be positive.</param>
    /// <param name="epsilon">ε; must be positive.</param>
    public static LennardJones FromSigmaEpsilon(Length sigma, Energy epsilon)
    {
        Preconditions.CheckPositive(sigma.InAngstroms, nameof(sigma));
        Preconditions.CheckPositive(epsilon.InElectronVolts, nameof(epsilon));
        return new LennardJones(Math.Pow(2, 1.0 / 6) * sigma.InAngstroms, epsilon.InElectronVolts, givenBySigma: true);
    }

    /// <summary>Builds the potential from the position of its minimum r_min and its well depth ε.</summary>
    /// <param name="equilibriumDistance">r_min; must be positive.</param>
    /// <param name="wellDepth">ε (positive: the minimum is at −ε).</param>
    public static LennardJones FromMinimum(Length equilibriumDistance, Energy wellDepth)
    {
        Preconditions.CheckPositive(equilibriumDistance.InAngstroms, nameof(equilibriumDistance));
        Preconditions.CheckPositive(wellDepth.InElectronVolts, nameof(wellDepth));
        return new LennardJones(equilibriumDistance.InAngstroms, wellDepth.InElectronVolts, givenBySigma: false);
    }

    /// <summary>σ = r_min/2^(1/6), in Å.</summary>
    public double SigmaInAngstroms => _rMin / Math.Pow(2, 1.0 / 6);

    /// <summary>The well depth ε, in eV.</summary>
    public double EpsilonInElectronVolts => _epsilon;

    /// <summary>The position of the minimum r_min, in Å.</summary>
    public double EquilibriumDistanceInAngstroms => _rMin;

    /// <inheritdoc/>
    public double DomainLower => 0;

    /// <inheritdoc/>
    public double DomainUpper => double.PositiveInfinity;

    /// <inheritdoc/>
    public PotentialWell? Well => new(_rMin, -_epsilon, _epsilon);

    /// <inheritdoc/>
    public string Description => _givenBySigma
        ? string.Create(CultureInfo.InvariantCulture, $"Lennard-Jones (ε = {_epsilon:G6} eV, σ = {SigmaInAngstroms:G6} Å; r_min = {_rMin:G6} Å)")
        : string.Create(CultureInfo.InvariantCulture, $"Lennard-Jones (ε = {_epsilon:G6} eV, r_min = {_rMin:G6} Å; σ = {SigmaInAngstroms:G6} Å)");

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
        var s2 = TOps.Divide(TOps.Broadcast(_rMinSquared), squaredDistance);
        var s6 = TOps.Multiply(TOps.Multiply(s2, s2), s2);
        return TOps.Multiply(TOps.Multiply(TOps.Broadcast(_epsilon), s6), TOps.Subtract(s6, TOps.Broadcast(2.0)));
    }

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double Energy(double r) => EnergyAtSquaredDistance(r * r);

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double EnergyAtSquaredDistance(double squaredDistance)
    {
        double s2 = _rMinSquared / squaredDistance;
        double s6 = s2 * s2 * s2;
        return _epsilon * s6 * (s6 - 2.0);
    }

    /// <inheritdoc/>
    public PairDerivatives Derivatives(double r)
    {
        double s = _rMin / r;
        double s6 = s * s * s * s * s * s;
        double s12 = s6 * s6;
        double u = _epsilon;
        return new PairDerivatives(
            u * (s12 - 2 * s6),
            u * (-12 * s12 + 12 * s6) / r,
            u * (156 * s12 - 84 * s6) / (r * r),
            u * (-2184 * s12 + 672 * s6) / (r * r * r),
            u * (32760 * s12 - 6048 * s6) / (r * r * r * r));
    }
}
