using System;
using System.Globalization;
using System.Runtime.CompilerServices;
using ThermalSampling.Numerics;
using ThermalSampling.Internal;
using ThermalSampling.Units;

namespace ThermalSampling.Potentials;

/// <summary>
/// The Morse potential V(r) = D[(1 − e^(−a(r − re)))² − 1]: minimum −D at re, V → 0 as r → ∞.
/// </summary>
public readonly struct Morse : IPairPotential
{
    private readonly double _d;
    private readonly double _a;
    private readonly double _re;

    /// <summary>Builds a Morse potential.</summary>
    /// <param name="wellDepth">D; must be positive.</param>
    /// <param name="widthPerAngstrom">a, in 1/Å; must be positive.</param>
    /// <param name="equilibriumDistance">re; must be positive.</param>
    public Morse(Energy wellDepth, double widthPerAngstrom, Length equilibriumDistance)
    {
        _d = Preconditions.CheckPositive(wellDepth.InElectronVolts, nameof(wellDepth));
        _a = Preconditions.CheckPositive(widthPerAngstrom, nameof(widthPerAngstrom));
        _re = Preconditions.CheckPositive(equilibriumDistance.InAngstroms, nameof(equilibriumDistance));
    }

    /// <summary>D, in eV.</summary>
    public double WellDepthInElectronVolts => _d;

    /// <summary>a, in 1/Å.</summary>
    public double WidthPerAngstrom => _a;

    /// <summary>re, in Å.</summary>
    public double EquilibriumDistanceInAngstroms => _re;

    /// <inheritdoc/>
    public double DomainLower => 0;

    /// <inheritdoc/>
    public double DomainUpper => double.PositiveInfinity;

    /// <inheritdoc/>
    public PotentialWell? Well => new(_re, -_d, _d);

    /// <inheritdoc/>
    public string Description => string.Create(CultureInfo.InvariantCulture,
        $"Morse (D = {_d:G6} eV, a = {_a:G6} 1/Å, re = {_re:G6} Å)");

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergy<TOps, TD, TB>(TD r)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var e = LaneMath.Exp<TOps, TD, TB>(TOps.Multiply(TOps.Broadcast(-_a), TOps.Subtract(r, TOps.Broadcast(_re))));
        return TOps.Multiply(TOps.Multiply(TOps.Broadcast(_d), e), TOps.Subtract(e, TOps.Broadcast(2.0)));
    }

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergyAtSquaredDistance<TOps, TD, TB>(TD squaredDistance)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        => LaneForms.ViaDistance<TOps, TD, TB, Morse>(this, squaredDistance);

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double Energy(double r)
    {
        double e = Math.Exp(-_a * (r - _re));
        return _d * e * (e - 2.0);
    }

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double EnergyAtSquaredDistance(double squaredDistance) => Energy(Math.Sqrt(squaredDistance));

    /// <inheritdoc/>
    public PairDerivatives Derivatives(double r)
    {
        double e = Math.Exp(-_a * (r - _re));
        double e2 = e * e;
        double a = _a, a2 = a * a, a3 = a2 * a, a4 = a2 * a2;
        return new PairDerivatives(
            _d * (e2 - 2 * e),
            _d * (-2 * a * e2 + 2 * a * e),
            _d * (4 * a2 * e2 - 2 * a2 * e),
            _d * (-8 * a3 * e2 + 2 * a3 * e),
            _d * (16 * a4 * e2 - 2 * a4 * e));
    }
}
