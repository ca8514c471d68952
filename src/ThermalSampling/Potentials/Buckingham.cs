using System;
using System.Globalization;
using System.Runtime.CompilerServices;
using ThermalSampling.Numerics;
using ThermalSampling.Internal;
using ThermalSampling.Units;

namespace ThermalSampling.Potentials;

/// <summary>
/// The Buckingham potential V(r) = A e^(−r/ρ) − C/r⁶.
/// </summary>
/// <remarks>
/// For C &gt; 0 the form has a spurious maximum at short range (the barrier) and falls to −∞ as
/// r → 0. The barrier is located at construction and becomes <see cref="DomainLower"/>: landscapes
/// refuse windows that reach inside it, so nothing is ever sampled or integrated there.
/// With C = 0 the form is purely repulsive and has no well (it binds only together with other terms).
/// </remarks>
public readonly struct Buckingham : IPairPotential
{
    private readonly double _a;
    private readonly double _rho;
    private readonly double _c;
    private readonly double _barrier;
    private readonly PotentialWell? _well;

    /// <summary>Builds a Buckingham potential.</summary>
    /// <param name="repulsionPrefactor">A; must be positive.</param>
    /// <param name="rho">ρ, the repulsion range; must be positive.</param>
    /// <param name="dispersionElectronVoltAngstrom6">C, in eV·Å⁶; must be finite and at least 0.</param>
    /// <exception cref="ArgumentException">When C &gt; 0 but A e^(−r/ρ) never balances C/r⁶, so the form has
    /// no barrier and no minimum (it falls to −∞ everywhere).</exception>
    public Buckingham(Energy repulsionPrefactor, Length rho, double dispersionElectronVoltAngstrom6)
    {
        _a = Preconditions.CheckPositive(repulsionPrefactor.InElectronVolts, nameof(repulsionPrefactor));
        _rho = Preconditions.CheckPositive(rho.InAngstroms, nameof(rho));
        _c = Preconditions.CheckNonNegative(dispersionElectronVoltAngstrom6, nameof(dispersionElectronVoltAngstrom6));
        if (_c == 0)
        {
            _barrier = 0;
            _well = null;
            return;
        }

        // V'(r) = 0  <=>  (A/ρ) r⁷ e^(−r/ρ) = 6C. The left side peaks at r = 7ρ; the barrier lies below, the minimum above.
        double a = _a, p = _rho, c = _c;
        double Balance(double r) => a / p * Math.Exp(7 * Math.Log(r) - r / p) - 6 * c;
        double peak = 7 * p;
        if (Balance(peak) <= 0)
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                $"Buckingham A = {a:R} eV, rho = {p:R} Å, C = {c:R} eV·Å⁶ has no barrier and no minimum: the dispersion term dominates at every distance, so the energy falls to minus infinity everywhere. Increase A or rho, or decrease C."),
                nameof(dispersionElectronVoltAngstrom6));
        }
        _barrier = MathNet.Numerics.RootFinding.Brent.FindRoot(Balance, 1e-6 * peak, peak, 1e-14 * peak, 500);
        double outer = peak;
        while (Balance(outer) > 0)
        {
            outer *= 2;
        }
        double rMin = MathNet.Numerics.RootFinding.Brent.FindRoot(Balance, peak, outer, 1e-14 * peak, 500);
        double vMin = a * Math.Exp(-rMin / p) - c / Math.Pow(rMin, 6);
        _well = new PotentialWell(rMin, vMin, -vMin);
    }

    /// <summary>The position of the short-range barrier (the spurious maximum), Å; 0 when C = 0.</summary>
    public double BarrierDistanceInAngstroms => _barrier;

    /// <summary>The repulsion prefactor A, eV.</summary>
    public double RepulsionPrefactorInElectronVolts => _a;

    /// <summary>The repulsion length ρ, Å.</summary>
    public double RhoInAngstroms => _rho;

    /// <summary>The dispersion coefficient C, eV·Å⁶.</summary>
    public double DispersionElectronVoltAngstrom6 => _c;

    /// <summary>The height of the barrier, V(barrier), eV; +∞ when C = 0.</summary>
    public double BarrierEnergyInElectronVolts => _c == 0 ? double.PositiveInfinity : Energy(_barrier);

    /// <inheritdoc/>
    public double DomainLower => _barrier;

    /// <inheritdoc/>
    public double DomainUpper => double.PositiveInfinity;

    /// <inheritdoc/>
    public PotentialWell? Well => _well;

    /// <inheritdoc/>
    public string Description => string.Create(CultureInfo.InvariantCulture,
        $"Buckingham (A = {_a:G6} eV, rho = {_rho:G6} Å, C = {_c:G6} eV·Å⁶)");

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergy<TOps, TD, TB>(TD r)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var r2 = TOps.Multiply(r, r);
        var r6 = TOps.Multiply(TOps.Multiply(r2, r2), r2);
        var repulsion = TOps.Multiply(TOps.Broadcast(_a), LaneMath.Exp<TOps, TD, TB>(TOps.Divide(TOps.Multiply(r, TOps.Broadcast(-1.0)), TOps.Broadcast(_rho))));
        return TOps.Subtract(repulsion, TOps.Divide(TOps.Broadcast(_c), r6));
    }

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergyAtSquaredDistance<TOps, TD, TB>(TD squaredDistance)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        => LaneForms.ViaDistance<TOps, TD, TB, Buckingham>(this, squaredDistance);

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double Energy(double r)
    {
        double r2 = r * r;
        return _a * Math.Exp(-r / _rho) - _c / (r2 * r2 * r2);
    }

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double EnergyAtSquaredDistance(double squaredDistance)
        => _a * Math.Exp(-Math.Sqrt(squaredDistance) / _rho) - _c / (squaredDistance * squaredDistance * squaredDistance);

    /// <inheritdoc/>
    public PairDerivatives Derivatives(double r)
    {
        double e = _a * Math.Exp(-r / _rho);
        double p = _rho;
        double r6 = Math.Pow(r, 6);
        double c6 = _c / r6;
        return new PairDerivatives(
            e - c6,
            -e / p + 6 * c6 / r,
            e / (p * p) - 42 * c6 / (r * r),
            -e / (p * p * p) + 336 * c6 / (r * r * r),
            e / (p * p * p * p) - 3024 * c6 / (r * r * r * r));
    }
}
