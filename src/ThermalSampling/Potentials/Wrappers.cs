using System;
using System.Globalization;
using System.Runtime.CompilerServices;
using ThermalSampling.Internal;
using ThermalSampling.Numerics;
using ThermalSampling.Units;

namespace ThermalSampling.Potentials;

/// <summary>
/// A potential truncated at a cut-off distance: V(r) for r &lt; rc and 0 beyond. The energy jumps at rc
/// by −V(rc); use <see cref="ShiftedCutOffPotential{TPotential}"/> for a continuous energy.
/// </summary>
/// <typeparam name="TPotential">The wrapped potential, a struct so calls are specialised.</typeparam>
public readonly struct CutOffPotential<TPotential> : IPairPotential where TPotential : struct, IPairPotential
{
    private readonly TPotential _inner;
    private readonly double _rc;
    private readonly double _rcSquared;

    /// <summary>Truncates <paramref name="inner"/> at <paramref name="cutOff"/>.</summary>
    /// <param name="inner">The potential to truncate.</param>
    /// <param name="cutOff">rc; must be above the inner potential's lower domain bound.</param>
    public CutOffPotential(TPotential inner, Length cutOff)
    {
        _inner = inner;
        Preconditions.CheckRange(cutOff.InAngstroms, Math.BitIncrement(inner.DomainLower), inner.DomainUpper, nameof(cutOff));
        _rc = cutOff.InAngstroms;
        _rcSquared = _rc * _rc;
    }

    /// <summary>The cut-off distance, Å.</summary>
    public double CutOffInAngstroms => _rc;

    /// <inheritdoc/>
    public double DomainLower => _inner.DomainLower;

    /// <inheritdoc/>
    public double DomainUpper => _inner.DomainUpper;

    /// <inheritdoc/>
    public PotentialWell? Well => _inner.Well is { } w && w.EquilibriumDistanceInAngstroms < _rc
        ? new PotentialWell(w.EquilibriumDistanceInAngstroms, w.MinimumEnergyInElectronVolts, Math.Max(0, -w.MinimumEnergyInElectronVolts)) : null;

    /// <inheritdoc/>
    public string Description => string.Create(CultureInfo.InvariantCulture, $"{_inner.Description}, cut off at {_rc:G6} Å");

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double Energy(double r) => r < _rc ? _inner.Energy(r) : 0.0;

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double EnergyAtSquaredDistance(double squaredDistance) => squaredDistance < _rcSquared ? _inner.EnergyAtSquaredDistance(squaredDistance) : 0.0;

    /// <inheritdoc/>
    public PairDerivatives Derivatives(double r) => r < _rc ? _inner.Derivatives(r) : default;

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergy<TOps, TD, TB>(TD r)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        => CutOffLanes.Energy<TOps, TD, TB, TPotential>(_inner, r, _rc, 0.0, squared: false);

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergyAtSquaredDistance<TOps, TD, TB>(TD squaredDistance)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        => CutOffLanes.Energy<TOps, TD, TB, TPotential>(_inner, squaredDistance, _rcSquared, 0.0, squared: true);
}

/// <summary>The lane form of a cut-off, plain or shifted: one place for the select at the cut-off.</summary>
internal static class CutOffLanes
{
    /// <summary>
    /// inner(x) − shift below <paramref name="limit"/> and 0 from it on, in every lane; x is r (limit rc) or r² (limit rc²).
    /// Lanes beyond the cut-off evaluate the inner form at the limit (inside its domain) and are then set to 0.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static TD Energy<TOps, TD, TB, TPotential>(in TPotential inner, TD x, double limit, double shift, bool squared)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        where TPotential : struct, IPairPotential
    {
        var inside = TOps.LessThan(x, TOps.Broadcast(limit));
        var clamped = TOps.Select(inside, x, TOps.Broadcast(limit));
        var e = squared ? inner.LaneEnergyAtSquaredDistance<TOps, TD, TB>(clamped) : inner.LaneEnergy<TOps, TD, TB>(clamped);
        return TOps.Select(inside, shift == 0 ? e : TOps.Subtract(e, TOps.Broadcast(shift)), TOps.Broadcast(0.0));
    }
}

/// <summary>
/// A potential truncated and shifted at a cut-off: V(r) − V(rc) for r &lt; rc and 0 beyond, so the energy
/// is continuous (its derivatives are not).
/// </summary>
/// <typeparam name="TPotential">The wrapped potential.</typeparam>
public readonly struct ShiftedCutOffPotential<TPotential> : IPairPotential where TPotential : struct, IPairPotential
{
    private readonly TPotential _inner;
    private readonly double _rc;
    private readonly double _rcSquared;
    private readonly double _shift;

    /// <summary>Truncates and shifts <paramref name="inner"/> at <paramref name="cutOff"/>.</summary>
    /// <param name="inner">The potential.</param>
    /// <param name="cutOff">rc; must be above the inner potential's lower domain bound.</param>
    public ShiftedCutOffPotential(TPotential inner, Length cutOff)
    {
        _inner = inner;
        Preconditions.CheckRange(cutOff.InAngstroms, Math.BitIncrement(inner.DomainLower), inner.DomainUpper, nameof(cutOff));
        _rc = cutOff.InAngstroms;
        _rcSquared = _rc * _rc;
        _shift = inner.Energy(_rc);
    }

    /// <summary>The cut-off distance, Å.</summary>
    public double CutOffInAngstroms => _rc;

    /// <summary>The energy subtracted inside the cut-off, V(rc), eV.</summary>
    public double ShiftInElectronVolts => _shift;

    /// <inheritdoc/>
    public double DomainLower => _inner.DomainLower;

    /// <inheritdoc/>
    public double DomainUpper => _inner.DomainUpper;

    /// <inheritdoc/>
    public PotentialWell? Well => _inner.Well is { } w && w.EquilibriumDistanceInAngstroms < _rc
        ? new PotentialWell(w.EquilibriumDistanceInAngstroms, w.MinimumEnergyInElectronVolts - _shift, Math.Max(0, _shift - w.MinimumEnergyInElectronVolts)) : null;

    /// <inheritdoc/>
    public string Description => string.Create(CultureInfo.InvariantCulture, $"{_inner.Description}, shifted and cut off at {_rc:G6} Å");

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double Energy(double r) => r < _rc ? _inner.Energy(r) - _shift : 0.0;

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double EnergyAtSquaredDistance(double squaredDistance) => squaredDistance < _rcSquared ? _inner.EnergyAtSquaredDistance(squaredDistance) - _shift : 0.0;

    /// <inheritdoc/>
    public PairDerivatives Derivatives(double r)
    {
        if (r >= _rc)
        {
            return default;
        }
        var d = _inner.Derivatives(r);
        return d with { Energy = d.Energy - _shift };
    }

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergy<TOps, TD, TB>(TD r)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        => CutOffLanes.Energy<TOps, TD, TB, TPotential>(_inner, r, _rc, _shift, squared: false);

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergyAtSquaredDistance<TOps, TD, TB>(TD squaredDistance)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        => CutOffLanes.Energy<TOps, TD, TB, TPotential>(_inner, squaredDistance, _rcSquared, _shift, squared: true);
}

/// <summary>The sum of two pair potentials, V = V1 + V2, on the intersection of their domains. Nest it for more terms.</summary>
/// <typeparam name="TFirst">The first term.</typeparam>
/// <typeparam name="TSecond">The second term.</typeparam>
public readonly struct SumPotential<TFirst, TSecond> : IPairPotential
    where TFirst : struct, IPairPotential
    where TSecond : struct, IPairPotential
{
    private readonly TFirst _first;
    private readonly TSecond _second;
    private readonly PotentialWell? _well;

    /// <summary>Adds two potentials. The well is searched for between 0.2 and 5 times the components' equilibrium distances (1–10 Å when neither has a well).</summary>
    /// <param name="first">The first term.</param>
    /// <param name="second">The second term.</param>
    public SumPotential(TFirst first, TSecond second) : this(first, second, null, null) { }

    /// <summary>Adds two potentials and searches for the well between the given separations.</summary>
    /// <param name="first">The first term.</param>
    /// <param name="second">The second term.</param>
    /// <param name="wellSearchLower">Lower end of the well search; null for the default.</param>
    /// <param name="wellSearchUpper">Upper end of the well search; null for the default.</param>
    public SumPotential(TFirst first, TSecond second, Length? wellSearchLower, Length? wellSearchUpper)
    {
        _first = first;
        _second = second;
        double lowerDomain = Math.Max(first.DomainLower, second.DomainLower);
        double upperDomain = Math.Min(first.DomainUpper, second.DomainUpper);
        if (!(lowerDomain < upperDomain))
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                $"The domains of '{first.Description}' and '{second.Description}' do not overlap ([{lowerDomain:R}, {upperDomain:R}] Å is empty)."),
                nameof(second));
        }
        double small = double.PositiveInfinity, large = 0;
        foreach (var w in new[] { first.Well, second.Well })
        {
            if (w is not null)
            {
                small = Math.Min(small, w.EquilibriumDistanceInAngstroms);
                large = Math.Max(large, w.EquilibriumDistanceInAngstroms);
            }
        }
        if (large == 0)
        {
            small = 5;
            large = 2;
        }
        double lo = wellSearchLower?.InAngstroms ?? 0.2 * small;
        double hi = wellSearchUpper?.InAngstroms ?? 5 * large;
        lo = Math.Max(lo, lowerDomain + 1e-9 * Math.Max(1, lowerDomain));
        hi = Math.Min(hi, upperDomain);
        Preconditions.CheckOrdered(lo, hi, nameof(wellSearchUpper));
        var self = this;
        double? r0 = WellLocator.FindLowestMinimum(self.Energy, r => self.Derivatives(r).First, lo, hi);
        if (r0 is double rm)
        {
            double vMin = self.Energy(rm);
            double far = double.IsPositiveInfinity(upperDomain) ? 1e4 * Math.Max(large, 1) : upperDomain;
            _well = new PotentialWell(rm, vMin, self.Energy(far) - vMin);
        }
        else
        {
            _well = null;
        }
    }

    /// <inheritdoc/>
    public double DomainLower => Math.Max(_first.DomainLower, _second.DomainLower);

    /// <inheritdoc/>
    public double DomainUpper => Math.Min(_first.DomainUpper, _second.DomainUpper);

    /// <inheritdoc/>
    public PotentialWell? Well => _well;

    /// <inheritdoc/>
    public string Description => $"{_first.Description} + {_second.Description}";

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double Energy(double r) => _first.Energy(r) + _second.Energy(r);

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double EnergyAtSquaredDistance(double squaredDistance) => _first.EnergyAtSquaredDistance(squaredDistance) + _second.EnergyAtSquaredDistance(squaredDistance);

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergy<TOps, TD, TB>(TD r)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        => TOps.Add(_first.LaneEnergy<TOps, TD, TB>(r), _second.LaneEnergy<TOps, TD, TB>(r));

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergyAtSquaredDistance<TOps, TD, TB>(TD squaredDistance)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        => TOps.Add(_first.LaneEnergyAtSquaredDistance<TOps, TD, TB>(squaredDistance), _second.LaneEnergyAtSquaredDistance<TOps, TD, TB>(squaredDistance));

    /// <inheritdoc/>
    public PairDerivatives Derivatives(double r) => _first.Derivatives(r) + _second.Derivatives(r);
}

/// <summary>Combining rules for unlike pairs.</summary>
public static class MixingRules
{
    /// <summary>
    /// Lorentz–Berthelot: σ_ij = (σ_i + σ_j)/2, ε_ij = √(ε_i ε_j) (Lorentz 1881; Berthelot 1898).
    /// </summary>
    /// <param name="first">The like-pair potential of species i.</param>
    /// <param name="second">The like-pair potential of species j.</param>
    public static LennardJones LorentzBerthelot(LennardJones first, LennardJones second)
        => LennardJones.FromSigmaEpsilon(
            Length.FromAngstroms(0.5 * (first.SigmaInAngstroms + second.SigmaInAngstroms)),
            Energy.FromElectronVolts(Math.Sqrt(first.EpsilonInElectronVolts * second.EpsilonInElectronVolts)));

    /// <summary>
    /// The geometric rule for Buckingham pairs: A_ij = √(A_i A_j), ρ_ij = (ρ_i + ρ_j)/2, C_ij = √(C_i C_j) (common practice,
    /// no source; one of several rules in use, named in reports when applied).
    /// </summary>
    /// <param name="first">The like-pair potential of species i.</param>
    /// <param name="second">The like-pair potential of species j.</param>
    public static Buckingham Geometric(Buckingham first, Buckingham second)
        => new(Energy.FromElectronVolts(Math.Sqrt(first.RepulsionPrefactorInElectronVolts * second.RepulsionPrefactorInElectronVolts)),
            Length.FromAngstroms(0.5 * (first.RhoInAngstroms + second.RhoInAngstroms)),
            Math.Sqrt(first.DispersionElectronVoltAngstrom6 * second.DispersionElectronVoltAngstrom6));

    /// <summary>
    /// The geometric rule for Morse pairs: D_ij = √(D_i D_j), a_ij = (a_i + a_j)/2, r_ij = (r_i + r_j)/2 (common practice,
    /// no source; named in reports when applied).
    /// </summary>
    /// <param name="first">The like-pair potential of species i.</param>
    /// <param name="second">The like-pair potential of species j.</param>
    public static Morse Geometric(Morse first, Morse second)
        => new(Energy.FromElectronVolts(Math.Sqrt(first.WellDepthInElectronVolts * second.WellDepthInElectronVolts)),
            0.5 * (first.WidthPerAngstrom + second.WidthPerAngstrom),
            Length.FromAngstroms(0.5 * (first.EquilibriumDistanceInAngstroms + second.EquilibriumDistanceInAngstroms)));
}
