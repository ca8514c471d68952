using System;
using System.Globalization;
using ThermalSampling.Internal;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Landscapes;

/// <summary>How the separation coordinate of a pair is weighted.</summary>
public enum SeparationGeometry
{
    /// <summary>The particle moves along one line: weight e^(−V(r)/kT).</summary>
    Line = 0,

    /// <summary>A pair free to rotate in 3D: weight r² e^(−V(r)/kT). The r² Jacobian pushes the
    /// distribution outwards, so the mean separation and the spread differ from the line case.</summary>
    Radial = 2,
}

/// <summary>
/// One separation coordinate r in a pair potential, confined to a window [lower, upper] with hard
/// walls: the line and radial landscapes.
/// </summary>
/// <typeparam name="TPotential">The pair potential.</typeparam>
public sealed class PairLandscape<TPotential> where TPotential : struct, IPairPotential
{
    internal PairLandscape(TPotential potential, SeparationGeometry geometry, double lower, double upper)
    {
        Potential = potential;
        Geometry = geometry;
        WindowLowerInAngstroms = lower;
        WindowUpperInAngstroms = upper;
    }

    /// <summary>The pair potential.</summary>
    public TPotential Potential { get; }

    /// <summary>Line or radial weighting.</summary>
    public SeparationGeometry Geometry { get; }

    /// <summary>The power n of the Jacobian rⁿ: 0 on a line, 2 for a radial pair.</summary>
    public int JacobianPower => (int)Geometry;

    /// <summary>The lower hard wall, Å.</summary>
    public double WindowLowerInAngstroms { get; }

    /// <summary>The upper hard wall, Å.</summary>
    public double WindowUpperInAngstroms { get; }

    /// <summary>The window width, Å.</summary>
    public double WindowWidthInAngstroms => WindowUpperInAngstroms - WindowLowerInAngstroms;

    /// <summary>Whether <paramref name="r"/> (Å) lies inside the window.</summary>
    /// <param name="r">The separation, Å.</param>
    public bool Contains(double r) => r >= WindowLowerInAngstroms && r <= WindowUpperInAngstroms;

    /// <summary>The potential energy at <paramref name="r"/> (Å), in eV, checked: NaN or −∞ throws
    /// <see cref="NonFiniteEnergyException"/>; +∞ (a hard core) is allowed and has zero weight.</summary>
    /// <param name="r">The separation, Å.</param>
    public double CheckedEnergy(double r)
    {
        double v = Potential.Energy(r);
        if (double.IsNaN(v) || double.IsNegativeInfinity(v))
        {
            throw new NonFiniteEnergyException(r, v, Potential.Description);
        }
        return v;
    }

    /// <summary>A description for reports.</summary>
    public string Description => string.Create(CultureInfo.InvariantCulture,
        $"{(Geometry == SeparationGeometry.Line ? "line" : "radial")} landscape on [{WindowLowerInAngstroms:G6}, {WindowUpperInAngstroms:G6}] Å in {Potential.Description}");
}

/// <summary>Factories for <see cref="PairLandscape{TPotential}"/>.</summary>
public static class PairLandscape
{
    /// <summary>A particle moving along a line in <paramref name="potential"/>, between hard walls.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="potential">The pair potential.</param>
    /// <param name="windowLower">The lower wall; at least the potential's lower domain bound (for Buckingham, the barrier).</param>
    /// <param name="windowUpper">The upper wall; above the lower one and at most the potential's upper domain bound.</param>
    public static PairLandscape<TPotential> Line<TPotential>(TPotential potential, Length windowLower, Length windowUpper)
        where TPotential : struct, IPairPotential
        => Create(potential, SeparationGeometry.Line, windowLower, windowUpper);

    /// <summary>A pair free to rotate in 3D (weight r² e^(−V/kT)), between hard walls in r.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="potential">The pair potential.</param>
    /// <param name="windowLower">The lower wall; at least the potential's lower domain bound.</param>
    /// <param name="windowUpper">The upper wall.</param>
    public static PairLandscape<TPotential> Radial<TPotential>(TPotential potential, Length windowLower, Length windowUpper)
        where TPotential : struct, IPairPotential
        => Create(potential, SeparationGeometry.Radial, windowLower, windowUpper);

    /// <summary>A landscape of the given geometry.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="potential">The pair potential.</param>
    /// <param name="geometry">Line or radial.</param>
    /// <param name="windowLower">The lower wall.</param>
    /// <param name="windowUpper">The upper wall.</param>
    public static PairLandscape<TPotential> Create<TPotential>(TPotential potential, SeparationGeometry geometry, Length windowLower, Length windowUpper)
        where TPotential : struct, IPairPotential
    {
        double lo = windowLower.InAngstroms, hi = windowUpper.InAngstroms;
        if (geometry is not (SeparationGeometry.Line or SeparationGeometry.Radial))
        {
            throw new ArgumentOutOfRangeException(nameof(geometry), geometry, "geometry must be Line or Radial.");
        }
        Preconditions.CheckNonNegative(lo, nameof(windowLower));
        Preconditions.CheckOrdered(lo, hi, "window");
        if (lo < potential.DomainLower)
        {
            string why = potential is Buckingham
                ? "it reaches inside the short-range barrier of the Buckingham form, below which the energy falls to minus infinity"
                : "it starts below the potential's domain";
            throw new ArgumentOutOfRangeException(nameof(windowLower), lo, string.Create(CultureInfo.InvariantCulture,
                $"windowLower = {lo:R} Å is invalid: {why}. The window must start at or above {potential.DomainLower:R} Å."));
        }
        if (hi > potential.DomainUpper)
        {
            throw new ArgumentOutOfRangeException(nameof(windowUpper), hi, string.Create(CultureInfo.InvariantCulture,
                $"windowUpper = {hi:R} Å is beyond the potential's domain, which ends at {potential.DomainUpper:R} Å."));
        }
        return new PairLandscape<TPotential>(potential, geometry, lo, hi);
    }
}
