using System.Runtime.CompilerServices;
using System;
using System.Globalization;
using MathNet.Numerics.Differentiation;
using ThermalSampling.Internal;
using ThermalSampling.Units;

using ThermalSampling.Numerics;

namespace ThermalSampling.Potentials;

/// <summary>
/// A user-supplied pair potential given as a delegate V(r) (r in Å, V in eV) on a finite domain.
/// Derivatives come from a delegate when given, otherwise from MathNet.Numerics' finite-difference
/// stencils (7 points, central), which are accurate to roughly 1e-6 relative for the second derivative
/// and 1e-3 for the fourth on smooth functions.
/// </summary>
/// <remarks>
/// A delegate call per energy evaluation is slower than the built-in forms; for long runs, write a
/// struct implementing <see cref="IPairPotential"/> instead. The library checks every energy it uses:
/// a delegate that returns NaN or ±∞ inside the domain makes the analysis or the sampler throw
/// <see cref="NonFiniteEnergyException"/> naming the separation.
/// </remarks>
public readonly struct FunctionPotential : IPairPotential
{
    private readonly Func<double, double> _energy;
    private readonly Func<double, PairDerivatives>? _derivatives;
    private readonly double _lower;
    private readonly double _upper;
    private readonly PotentialWell? _well;
    private readonly string _description;

    /// <summary>Wraps a delegate as a pair potential.</summary>
    /// <param name="energyElectronVolts">V(r): separation in Å to energy in eV.</param>
    /// <param name="domainLower">The smallest separation where the delegate may be called; must be ≥ 0.</param>
    /// <param name="domainUpper">The largest separation where the delegate may be called; must be finite and above <paramref name="domainLower"/>.</param>
    /// <param name="derivatives">Optional analytic derivatives; when null, finite differences are used.</param>
    /// <param name="description">Optional text for reports.</param>
    public FunctionPotential(Func<double, double> energyElectronVolts, Length domainLower, Length domainUpper,
        Func<double, PairDerivatives>? derivatives = null, string? description = null)
    {
        _energy = Preconditions.CheckNotNull(energyElectronVolts, nameof(energyElectronVolts));
        Preconditions.CheckNonNegative(domainLower.InAngstroms, nameof(domainLower));
        Preconditions.CheckOrdered(domainLower.InAngstroms, domainUpper.InAngstroms, nameof(domainUpper));
        _lower = domainLower.InAngstroms;
        _upper = domainUpper.InAngstroms;
        _derivatives = derivatives;
        _description = description ?? "user-supplied potential";
        var self = this;
        double h = 1e-4 * (_upper - _lower);
        double lo = _lower + 4 * h, hi = _upper - 4 * h;
        double? r0 = WellLocator.FindLowestMinimum(self.SafeEnergy, r => self.Derivatives(r).First, lo, hi);
        if (r0 is double rm)
        {
            double vMin = self.SafeEnergy(rm);
            _well = new PotentialWell(rm, vMin, self.SafeEnergy(_upper) - vMin);
        }
        else
        {
            _well = null;
        }
    }

    private double SafeEnergy(double r)
    {
        double v = _energy(r);
        if (!double.IsFinite(v))
        {
            throw new NonFiniteEnergyException(r, v, _description);
        }
        return v;
    }

    /// <inheritdoc/>
    public double DomainLower => _lower;

    /// <inheritdoc/>
    public double DomainUpper => _upper;

    /// <inheritdoc/>
    public PotentialWell? Well => _well;

    /// <inheritdoc/>
    public string Description => _description;

    /// <inheritdoc/>
    public double Energy(double r) => _energy(r);

    /// <inheritdoc/>
    public double EnergyAtSquaredDistance(double squaredDistance) => _energy(Math.Sqrt(squaredDistance));

    /// <summary>
    /// A 7-point stencil of spacing about <paramref name="step"/> that stays inside the domain: centred where there is room
    /// for three steps on each side, otherwise one-sided towards the roomier end with the step shrunk to fit six, so the
    /// delegate is never called outside [DomainLower, DomainUpper]. MathNet rounds an absolute step up to a power of two
    /// (0.1 becomes 0.125), so the room is measured for steps twice as long as asked. A fresh object per call:
    /// NumericalDerivative keeps its step as mutable state.
    /// </summary>
    private NumericalDerivative Stencil(double step, double r)
    {
        double below = r - _lower, above = _upper - r;
        if (below >= 6 * step && above >= 6 * step)
        {
            return new NumericalDerivative(7, 3) { StepType = StepType.Absolute, StepSize = step };
        }
        bool forward = above >= below;
        double room = forward ? above : below;
        return new NumericalDerivative(7, forward ? 0 : 6) { StepType = StepType.Absolute, StepSize = Math.Min(step, room / 12) };
    }

    /// <inheritdoc/>
    public PairDerivatives Derivatives(double r)
    {
        if (_derivatives is not null)
        {
            return _derivatives(r);
        }
        double v = SafeEnergy(r);
        Func<double, double> f = SafeEnergy;
        double scale = Math.Max(Math.Abs(r), 1e-3);
        var fine = Stencil(2e-3 * scale, r);
        var coarse = Stencil(1e-2 * scale, r);
        double d1 = fine.EvaluateDerivative(f, r, 1, v);
        double d2 = fine.EvaluateDerivative(f, r, 2, v);
        double d3 = coarse.EvaluateDerivative(f, r, 3, v);
        double d4 = coarse.EvaluateDerivative(f, r, 4, v);
        return new PairDerivatives(v, d1, d2, d3, d4);
    }

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergy<TOps, TD, TB>(TD r)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        => LaneForms.ByLane<TOps, TD, TB, FunctionPotential>(this, r);

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergyAtSquaredDistance<TOps, TD, TB>(TD squaredDistance)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        => LaneForms.ByLaneAtSquaredDistance<TOps, TD, TB, FunctionPotential>(this, squaredDistance);
}

/// <summary>Thrown when a potential returns NaN or ±∞ at a separation where the library needs its energy.</summary>
public sealed class NonFiniteEnergyException : ArithmeticException
{
    /// <summary>Creates the exception for separation <paramref name="separation"/> (Å) and value <paramref name="energy"/>.</summary>
    /// <param name="separation">The separation, Å; NaN when it is not known (the message then says so).</param>
    /// <param name="energy">The non-finite energy that was returned.</param>
    /// <param name="potentialDescription">Which potential returned it.</param>
    public NonFiniteEnergyException(double separation, double energy, string potentialDescription)
        : base(Describe(separation, energy, potentialDescription))
    {
        Separation = separation;
        ReturnedEnergy = energy;
    }

    private static string Describe(double separation, double energy, string potentialDescription) => double.IsNaN(separation)
        ? string.Create(CultureInfo.InvariantCulture,
            $"The potential '{potentialDescription}' returned {energy:R} at a separation that could not be recovered (a sum over pairs that overflowed, or a potential whose value changed between calls); energies must be finite inside the window.")
        : string.Create(CultureInfo.InvariantCulture,
            $"The potential '{potentialDescription}' returned {energy:R} at r = {separation:R} Å; energies must be finite inside the window.");

    /// <summary>The separation in Å at which the energy was not finite; NaN when it could not be recovered.</summary>
    public double Separation { get; }

    /// <summary>The value returned (NaN or ±∞).</summary>
    public double ReturnedEnergy { get; }
}
