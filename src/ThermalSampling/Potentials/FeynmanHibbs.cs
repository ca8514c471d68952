using System;
using System.Globalization;
using ThermalSampling.Internal;
using ThermalSampling.Units;

namespace ThermalSampling.Potentials;

/// <summary>
/// The Feynman–Hibbs effective potential: the classical distribution of a quantum particle's path centroid to first order
/// in ħ², from the potential smeared over a Gaussian of variance βħ²/(12m) per dimension (Feynman &amp; Hibbs, Quantum
/// Mechanics and Path Integrals (1965), the quadratic form recalled from memory and checked by the tests):
/// V_FH = V + (βħ²/24m)∇²V, with ∇²V = V″ on a line and V″ + 2V′/r for a central potential in three dimensions (a radial
/// pair, or each neighbour of a particle among sites). Sample it classically; the centroid's position moments are the
/// quantum ones' mean, and the quantum variance per dimension is the centroid's plus βħ²/(12m)
/// (<see cref="CentroidVarianceCorrectionInAngstromsSquared"/>). For a harmonic well this gives the first Wigner–Kirkwood
/// term exactly, (kT/k)[1 + (ħω/kT)²/12]. Valid while ħω/kT stays below about 2 (common practice, no source); beyond,
/// use the exact grid (<see cref="Analysis.QuantumPairDistribution"/>) or path integrals.
/// </summary>
public static class FeynmanHibbs
{
    /// <summary>βħ²/(12m), Å²: what a centroid's variance per dimension lacks of the quantum one.</summary>
    /// <param name="mass">The particle's mass.</param>
    /// <param name="temperature">The temperature.</param>
    public static double CentroidVarianceCorrectionInAngstromsSquared(Mass mass, Temperature temperature)
        => PhysicalConstants.HbarSquaredOverAtomicMassElectronVoltAngstromSquared / (12 * mass.InAtomicMassUnits * temperature.ThermalEnergyInElectronVolts);

    /// <summary>The effective potential on a line: V + (βħ²/24m)V″, on [<paramref name="domainLower"/>, <paramref name="domainUpper"/>].</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="potential">The potential.</param>
    /// <param name="mass">The particle's (reduced) mass.</param>
    /// <param name="temperature">The temperature the effective potential is for.</param>
    /// <param name="domainLower">Where it may be evaluated from (inside the potential's domain), Å.</param>
    /// <param name="domainUpper">Where it may be evaluated to, Å.</param>
    public static FunctionPotential Line<TPotential>(TPotential potential, Mass mass, Temperature temperature, Length domainLower, Length domainUpper)
        where TPotential : struct, IPairPotential
        => Build(potential, mass, temperature, domainLower, domainUpper, threeDimensional: false);

    /// <summary>The effective potential of a central pair term in three dimensions: V + (βħ²/24m)(V″ + 2V′/r).</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="potential">The potential.</param>
    /// <param name="mass">The particle's (reduced) mass.</param>
    /// <param name="temperature">The temperature the effective potential is for.</param>
    /// <param name="domainLower">Where it may be evaluated from (above 0 and inside the potential's domain), Å.</param>
    /// <param name="domainUpper">Where it may be evaluated to, Å.</param>
    public static FunctionPotential ThreeDimensional<TPotential>(TPotential potential, Mass mass, Temperature temperature, Length domainLower, Length domainUpper)
        where TPotential : struct, IPairPotential
    {
        Preconditions.CheckPositive(domainLower.InAngstroms, nameof(domainLower));
        return Build(potential, mass, temperature, domainLower, domainUpper, threeDimensional: true);
    }

    private static FunctionPotential Build<TPotential>(TPotential potential, Mass mass, Temperature temperature, Length domainLower, Length domainUpper,
        bool threeDimensional)
        where TPotential : struct, IPairPotential
    {
        if (domainLower.InAngstroms < potential.DomainLower || domainUpper.InAngstroms > potential.DomainUpper)
        {
            throw new ArgumentOutOfRangeException(nameof(domainLower), string.Create(CultureInfo.InvariantCulture,
                $"[{domainLower.InAngstroms:G6}, {domainUpper.InAngstroms:G6}] Å must lie inside the potential's domain [{potential.DomainLower:G6}, {potential.DomainUpper:G6}] Å."));
        }
        double c = 0.5 * CentroidVarianceCorrectionInAngstromsSquared(mass, temperature); // βħ²/(24m)
        var p = potential;
        double Effective(double r)
        {
            var d = p.Derivatives(r);
            return d.Energy + c * (d.Second + (threeDimensional ? 2 * d.First / r : 0));
        }
        return new FunctionPotential(Effective, domainLower, domainUpper, description: string.Create(CultureInfo.InvariantCulture,
            $"Feynman–Hibbs effective potential ({(threeDimensional ? "3D" : "line")}, {mass.InAtomicMassUnits:G6} u, {temperature.InKelvin:G6} K) of {potential.Description}"));
    }
}
