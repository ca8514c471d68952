using System;
using System.Runtime.CompilerServices;
using ThermalSampling.Numerics;

namespace ThermalSampling.Potentials;

/// <summary>
/// One of the built-in pair forms, or none: the potential type of a site whose species pairs use different forms (a
/// Lennard-Jones pair beside a Buckingham one), or have no short-range term at all. Every member forwards to the form it
/// holds; the branch on the form is the same for a whole run of sites of a species, so it is predicted and costs little.
/// </summary>
public readonly struct PairForm : IPairPotential, IEquatable<PairForm>
{
    private enum Kind : byte { None, LennardJones, Morse, Buckingham, Harmonic }

    private readonly Kind _kind;
    private readonly LennardJones _lj;
    private readonly Morse _morse;
    private readonly Buckingham _buckingham;
    private readonly HarmonicBond _harmonic;

    private PairForm(Kind kind, LennardJones lj = default, Morse morse = default, Buckingham buckingham = default, HarmonicBond harmonic = default)
        => (_kind, _lj, _morse, _buckingham, _harmonic) = (kind, lj, morse, buckingham, harmonic);

    /// <summary>No short-range term: V = 0 at every separation.</summary>
    public static PairForm None => new(Kind.None);

    /// <summary>A Lennard-Jones pair.</summary>
    /// <param name="potential">The pair.</param>
    public static PairForm From(LennardJones potential) => new(Kind.LennardJones, lj: potential);

    /// <summary>A Morse pair.</summary>
    /// <param name="potential">The pair.</param>
    public static PairForm From(Morse potential) => new(Kind.Morse, morse: potential);

    /// <summary>A Buckingham pair.</summary>
    /// <param name="potential">The pair.</param>
    public static PairForm From(Buckingham potential) => new(Kind.Buckingham, buckingham: potential);

    /// <summary>A harmonic bond.</summary>
    /// <param name="potential">The pair.</param>
    public static PairForm From(HarmonicBond potential) => new(Kind.Harmonic, harmonic: potential);

    /// <summary>Whether this is <see cref="None"/>.</summary>
    public bool IsNone => _kind == Kind.None;

    /// <inheritdoc/>
    public double Energy(double r) => _kind switch
    {
        Kind.LennardJones => _lj.Energy(r),
        Kind.Morse => _morse.Energy(r),
        Kind.Buckingham => _buckingham.Energy(r),
        Kind.Harmonic => _harmonic.Energy(r),
        _ => 0,
    };

    /// <inheritdoc/>
    public double EnergyAtSquaredDistance(double squaredDistance) => _kind switch
    {
        Kind.LennardJones => _lj.EnergyAtSquaredDistance(squaredDistance),
        Kind.Morse => _morse.EnergyAtSquaredDistance(squaredDistance),
        Kind.Buckingham => _buckingham.EnergyAtSquaredDistance(squaredDistance),
        Kind.Harmonic => _harmonic.EnergyAtSquaredDistance(squaredDistance),
        _ => 0,
    };

    /// <inheritdoc/>
    public PairDerivatives Derivatives(double r) => _kind switch
    {
        Kind.LennardJones => _lj.Derivatives(r),
        Kind.Morse => _morse.Derivatives(r),
        Kind.Buckingham => _buckingham.Derivatives(r),
        Kind.Harmonic => _harmonic.Derivatives(r),
        _ => default,
    };

    /// <inheritdoc/>
    public double DomainLower => _kind switch
    {
        Kind.LennardJones => _lj.DomainLower,
        Kind.Morse => _morse.DomainLower,
        Kind.Buckingham => _buckingham.DomainLower,
        Kind.Harmonic => _harmonic.DomainLower,
        _ => 0,
    };

    /// <inheritdoc/>
    public double DomainUpper => _kind switch
    {
        Kind.LennardJones => _lj.DomainUpper,
        Kind.Morse => _morse.DomainUpper,
        Kind.Buckingham => _buckingham.DomainUpper,
        Kind.Harmonic => _harmonic.DomainUpper,
        _ => double.PositiveInfinity,
    };

    /// <inheritdoc/>
    public PotentialWell? Well => _kind switch
    {
        Kind.LennardJones => _lj.Well,
        Kind.Morse => _morse.Well,
        Kind.Buckingham => _buckingham.Well,
        Kind.Harmonic => _harmonic.Well,
        _ => null,
    };

    /// <inheritdoc/>
    public string Description => _kind switch
    {
        Kind.LennardJones => _lj.Description,
        Kind.Morse => _morse.Description,
        Kind.Buckingham => _buckingham.Description,
        Kind.Harmonic => _harmonic.Description,
        _ => "no short-range term",
    };

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergy<TOps, TD, TB>(TD r)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct => _kind switch
        {
            Kind.LennardJones => _lj.LaneEnergy<TOps, TD, TB>(r),
            Kind.Morse => _morse.LaneEnergy<TOps, TD, TB>(r),
            Kind.Buckingham => _buckingham.LaneEnergy<TOps, TD, TB>(r),
            Kind.Harmonic => _harmonic.LaneEnergy<TOps, TD, TB>(r),
            _ => TOps.Broadcast(0.0),
        };

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergyAtSquaredDistance<TOps, TD, TB>(TD squaredDistance)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct => _kind switch
        {
            Kind.LennardJones => _lj.LaneEnergyAtSquaredDistance<TOps, TD, TB>(squaredDistance),
            Kind.Morse => _morse.LaneEnergyAtSquaredDistance<TOps, TD, TB>(squaredDistance),
            Kind.Buckingham => _buckingham.LaneEnergyAtSquaredDistance<TOps, TD, TB>(squaredDistance),
            Kind.Harmonic => _harmonic.LaneEnergyAtSquaredDistance<TOps, TD, TB>(squaredDistance),
            _ => TOps.Broadcast(0.0),
        };

    /// <inheritdoc/>
    public bool Equals(PairForm other)
        => _kind == other._kind && _lj.Equals(other._lj) && _morse.Equals(other._morse) && _buckingham.Equals(other._buckingham) && _harmonic.Equals(other._harmonic);

    /// <inheritdoc/>
    public override bool Equals(object? obj) => obj is PairForm other && Equals(other);

    /// <inheritdoc/>
    public override int GetHashCode() => HashCode.Combine(_kind, _lj, _morse, _buckingham, _harmonic);

    /// <summary>Whether two forms are the same form with the same parameters.</summary>
    /// <param name="left">One form.</param>
    /// <param name="right">The other.</param>
    public static bool operator ==(PairForm left, PairForm right) => left.Equals(right);

    /// <summary>Whether two forms differ.</summary>
    /// <param name="left">One form.</param>
    /// <param name="right">The other.</param>
    public static bool operator !=(PairForm left, PairForm right) => !left.Equals(right);
}
