using System;
using System.Globalization;
using MathNet.Numerics.Differentiation;
using ThermalSampling.Internal;
using ThermalSampling.Units;

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

    /// <inheritdoc/>
    public PairDerivatives Derivatives(double r)
    {
        if (_derivatives is not null)
        {
            return _derivatives(r);
        }
        double v = SafeEnergy(r);
        Func<double, double> f = SafeEnergy;
        // Step relative to the domain size keeps the stencil inside the domain near its ends as far as possible.
        double scale = Math.Max(Math.Abs(r), 1e-3);
        // A fresh stencil per call: NumericalDerivative keeps its step size as mutable state.
        var fine = new NumericalDerivative(7, 3) { StepType = StepType.Absolute, StepSize = 2e-3 * scale };
        var coarse = new NumericalDerivative(7, 3) { StepType = StepType.Absolute, StepSize = 1e-2 * scale };
        double d1 = fine.EvaluateDerivative(f, r, 1, v);
        double d2 = fine.EvaluateDerivative(f, r, 2, v);
        double d3 = coarse.EvaluateDerivative(f, r, 3, v);
        double d4 = coarse.EvaluateDerivative(f, r, 4, v);
        return new PairDerivatives(v, d1, d2, d3, d4);
    }
}

/// <summary>Thrown when a potential returns NaN or ±∞ at a separation where the library needs its energy.</summary>
public sealed class NonFiniteEnergyException : ArithmeticException
{
    /// <summary>Creates the exception for separation <paramref name="separation"/> (Å) and value <paramref name="energy"/>.</summary>
    /// <param name="separation">The separation, Å.</param>
    /// <param name="energy">The non-finite energy that was returned.</param>
    /// <param name="potentialDescription">Which potential returned it.</param>
    public NonFiniteEnergyException(double separation, double energy, string potentialDescription)
        : base(string.Create(CultureInfo.InvariantCulture,
            $"The potential '{potentialDescription}' returned {energy:R} at r = {separation:R} Å; energies must be finite inside the window."))
    {
        Separation = separation;
        ReturnedEnergy = energy;
    }

    /// <summary>The separation in Å at which the energy was not finite.</summary>
    public double Separation { get; }

    /// <summary>The value returned (NaN or ±∞).</summary>
    public double ReturnedEnergy { get; }
}
